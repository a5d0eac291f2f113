/**
 * Writes the sheet JSON Schema to public/schema/sheet-v<version>.json, or with --check only
 * reports whether the committed file is current (exit code 1 when it is stale).
 * Usage: npx tsx src/cli/write-json-schema.ts [--check]
 */
import { readFileSync, writeFileSync, mkdirSync, existsSync } from 'node:fs';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { SHEET_JSON_SCHEMA_PATH, sheetJsonSchemaText } from '../lib/sheet/json-schema';

const target = fileURLToPath(new URL(`../../public${SHEET_JSON_SCHEMA_PATH}`, import.meta.url));
const fresh = sheetJsonSchemaText();
const current = existsSync(target) ? readFileSync(target, 'utf8') : null;

if (process.argv.includes('--check')) {
  if (current === fresh) {
    console.log(`public${SHEET_JSON_SCHEMA_PATH} is current.`);
  } else {
    console.error(`public${SHEET_JSON_SCHEMA_PATH} is stale; run npx tsx src/cli/write-json-schema.ts`);
    process.exitCode = 1;
  }
} else if (current === fresh) {
  console.log(`public${SHEET_JSON_SCHEMA_PATH} unchanged.`);
} else {
  mkdirSync(dirname(target), { recursive: true });
  writeFileSync(target, fresh);
  console.log(`Wrote public${SHEET_JSON_SCHEMA_PATH} (${fresh.length} characters).`);
}
