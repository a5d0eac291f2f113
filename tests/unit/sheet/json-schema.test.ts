import { readFileSync, readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
// ajv 8 is an independent JSON Schema validator (draft 2020-12 build); installed through @astrojs/check.
import Ajv2020 from 'ajv/dist/2020';
import { describe, expect, it } from 'vitest';
import { SHEET_JSON_SCHEMA_PATH, createSheetJsonSchema, sheetJsonSchemaText } from '../../../src/lib/sheet/json-schema';
import { parseSheet } from '../../../src/lib/sheet/schema';

const repoRoot = new URL('../../../', import.meta.url);
const committedPath = fileURLToPath(new URL(`public${SHEET_JSON_SCHEMA_PATH}`, repoRoot));
const sheetsDir = new URL('content/sheets/', repoRoot);
const exampleFiles = readdirSync(sheetsDir).filter((f) => f.endsWith('.json'));
const readExample = (file: string): Record<string, any> => JSON.parse(readFileSync(new URL(file, sheetsDir), 'utf8'));

let compiled: ReturnType<Ajv2020['compile']> | undefined;
function compile() {
  compiled ??= new Ajv2020({ allErrors: true, strict: true }).compile(createSheetJsonSchema());
  return compiled;
}

describe('createSheetJsonSchema', () => {
  it('equals the committed file (run src/cli/write-json-schema.ts after changing the schema)', () => {
    expect(readFileSync(committedPath, 'utf8')).toBe(sheetJsonSchemaText());
  });

  it('is a valid draft 2020-12 schema for ajv in strict mode', () => {
    expect(() => compile()).not.toThrow();
  });

  it('has example sheets to check', () => {
    expect(exampleFiles.length).toBeGreaterThanOrEqual(6);
  });

  it.each(exampleFiles)('accepts the example %s, which parseSheet also accepts', (file) => {
    const validate = compile();
    const doc = readExample(file);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(parseSheet(doc).ok).toBe(true);
  });

  // Each structural fault must be caught by both the JSON Schema and parseSheet, at the same place.
  const faults: [string, (doc: Record<string, any>) => void, string, string][] = [
    ['missing title', (d) => delete d.title, '', 'title'],
    ['unknown top-level field', (d) => (d.colour = 'red'), '', 'colour'],
    ['wrong format', (d) => (d.format = 'other.sheet'), '/format', 'format'],
    ['wrong version', (d) => (d.version = 2), '/version', 'version'],
    ['unknown shape kind', (d) => (d.object.shape = { kind: 'torus', radius: 0.01 }), '/object/shape', 'object.shape'],
    ['boolean radius', (d) => (d.hand.fingers[0].roller.radius = true), '/hand/fingers/0/roller/radius', 'hand.fingers[0].roller.radius'],
    ['empty quantity string', (d) => (d.object.twist.linear[0] = ''), '/object/twist/linear/0', 'object.twist.linear[0]'],
    ['two-component axis', (d) => (d.hand.fingers[0].joints[0].axis = [0, 1]), '/hand/fingers/0/joints/0/axis', 'hand.fingers[0].joints[0].axis'],
    ['bad joint role', (d) => (d.hand.fingers[0].joints[0].role = 'wrist'), '/hand/fingers/0/joints/0/role', 'hand.fingers[0].joints[0].role'],
    ['no fingers', (d) => (d.hand.fingers = []), '/hand/fingers', 'hand.fingers'],
    ['nine fingers', (d) => (d.hand.fingers = Array.from({ length: 9 }, (_, i) => ({ ...d.hand.fingers[0], name: `f${i}` }))), '/hand/fingers', 'hand.fingers'],
    ['quaternion missing z', (d) => (d.motion.target.orientation = { w: 1, x: 0, y: 0 }), '/motion/target/orientation', 'motion.target.orientation'],
    ['fractional tick count', (d) => (d.motion.run = { maxTicks: 2.5 }), '/motion/run/maxTicks', 'motion.run.maxTicks'],
  ];

  it.each(faults)('rejects %s in both validators', (_, change, schemaPath, parsePath) => {
    const doc = readExample(exampleFiles[0]);
    change(doc);
    const validate = compile();
    expect(validate(doc)).toBe(false);
    expect(validate.errors?.some((e) => e.instancePath.startsWith(schemaPath))).toBe(true);
    const parsed = parseSheet(doc);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.issues.some((issue) => issue.path.startsWith(parsePath))).toBe(true);
  });

  it('leaves semantic checks to parseSheet: a non-unit quaternion passes the JSON Schema but not the parser', () => {
    const doc = readExample(exampleFiles[0]);
    doc.object.pose.orientation = { w: 2, x: 0, y: 0, z: 0 };
    delete doc.object.pose.normalize;
    expect(compile()(doc)).toBe(true);
    expect(parseSheet(doc).ok).toBe(false);
  });

  it('leaves names in quantity expressions to parseSheet: "fast" could be a variable, so only the parser rejects it', () => {
    const doc = readExample(exampleFiles[0]);
    doc.object.twist.linear[0] = 'fast';
    expect(compile()(doc)).toBe(true);
    const parsed = parseSheet(doc);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.issues[0]).toMatchObject({ path: 'object.twist.linear[0]', message: expect.stringContaining('unknown name "fast"') });
  });
});
