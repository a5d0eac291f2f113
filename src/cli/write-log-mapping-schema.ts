/**
 * Writes the log mapping JSON Schema to public/schema/log-mapping-v<version>.json, or with --check
 * only reports whether the committed file is current (exit code 1 when it is stale).
 * Usage: npx tsx src/cli/write-log-mapping-schema.ts [--check]
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { LOG_MAPPING_JSON_SCHEMA_PATH, logMappingJsonSchemaText } from '../lib/logs/json-schema';

const target = fileURLToPath(new URL(`../../public${LOG_MAPPING_JSON_SCHEMA_PATH}`, import.meta.url));
const fresh = logMappingJsonSchemaText();
const current = existsSync(target) ? readFileSync(target, 'utf8') : null;

if (process.argv.includes('--check')) {
  if (current === fresh) {
    console.log(`public${LOG_MAPPING_JSON_SCHEMA_PATH} is current.`);
  } else {
    console.error(`public${LOG_MAPPING_JSON_SCHEMA_PATH} is stale; run npx tsx src/cli/write-log-mapping-schema.ts`);
    process.exitCode = 1;
  }
} else if (current === fresh) {
  console.log(`public${LOG_MAPPING_JSON_SCHEMA_PATH} unchanged.`);
} else {
  mkdirSync(dirname(target), { recursive: true });
  writeFileSync(target, fresh);
  console.log(`Wrote public${LOG_MAPPING_JSON_SCHEMA_PATH} (${fresh.length} characters).`);
}
