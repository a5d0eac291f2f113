import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { WARNING_CATALOGUE, computeSheetGraspQuality, solveSheet, toPlainResult } from '../../../src/lib/kinematics/index';
import { createSheetJsonSchema } from '../../../src/lib/sheet/json-schema';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

const docsDir = new URL('../../../content/docs/', import.meta.url);
const read = (name: string) => readFileSync(new URL(name, docsDir), 'utf8');
const pages = readdirSync(docsDir).filter((name) => name.endsWith('.md')).sort();

/** Every property name anywhere in a JSON Schema. */
function propertyNames(schema: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(schema)) schema.forEach((item) => propertyNames(item, out));
  else if (schema !== null && typeof schema === 'object') {
    for (const [key, value] of Object.entries(schema)) {
      if (key === 'properties' && value && typeof value === 'object') Object.keys(value).forEach((name) => out.add(name));
      propertyNames(value, out);
    }
  }
  return out;
}

describe('product docs (content/docs)', () => {
  it.each(pages)('%s has YAML front matter with a title, a summary and an order', (page) => {
    const match = /^---\ntitle: (.+)\nsummary: (.+)\norder: (\d+)\n---\n/.exec(read(page));
    expect(match).not.toBeNull();
  });

  it('every reference page has its own place in the order', () => {
    const orders = pages.map((page) => /^---\ntitle: .+\nsummary: .+\norder: (\d+)\n/.exec(read(page))?.[1]);
    expect(new Set(orders).size).toBe(pages.length);
  });

  it('sheet-format.md names every field of the JSON Schema and links to it', () => {
    const text = read('sheet-format.md');
    expect(text).toContain('(/schema/sheet-v1.json)');
    const missing = [...propertyNames(createSheetJsonSchema())].filter((name) => !text.includes(`\`${name}\``));
    expect(missing).toEqual([]);
  });

  it('sheet-format.md examples are valid sheets', () => {
    const blocks = [...read('sheet-format.md').matchAll(/```json\n([\s\S]*?)```/g)].map((m) => m[1]);
    expect(blocks.length).toBeGreaterThan(0);
    for (const block of blocks) expect(parseSheet(JSON.parse(block)).ok).toBe(true);
  });

  it('warnings.md has a section per catalogue code stating its severity', () => {
    const text = read('warnings.md');
    for (const [code, info] of Object.entries(WARNING_CATALOGUE)) {
      const section = text.split(`\n## ${code}\n`)[1]?.split('\n## ')[0];
      expect(section, code).toBeDefined();
      expect(section).toContain(`Severity: **${info.severity}**`);
      expect(section).toContain(info.message);
    }
  });

  it('outputs.md explains every per-finger, grasp and object output', () => {
    const text = read('outputs.md');
    const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
    const solved = solveSheet(doc);
    solved.graspQuality = computeSheetGraspQuality(doc, solved);
    const plain = toPlainResult(solved);
    const finger = plain.fingers[0];
    const names = [
      ...Object.keys(plain.object).map((k) => `object.${k}`),
      ...Object.keys(finger).filter((k) => !['contact', 'full', 'steer'].includes(k)),
      ...(['contact', 'full', 'steer'] as const).flatMap((part) => Object.keys(finger[part]).map((k) => `${part}.${k}`)),
      ...Object.keys(plain.grasp).map((k) => `grasp.${k}`),
      ...Object.keys(plain.graspQuality ?? {}).map((k) => `graspQuality.${k}`),
      'warnings',
      'worstSeverity',
    ];
    const missing = names.filter((name) => !text.includes(`\`${name}\``));
    expect(missing).toEqual([]);
  });
});

describe('expression limits in sheet-format.md', () => {
  it('states every limit with its current value', async () => {
    const units = await import('../../../src/lib/sheet/units');
    const text = read('sheet-format.md').replace(/\s+/g, ' ');
    expect(text).toContain(`at most ${units.MAX_EXPRESSION_LENGTH} characters, ${units.MAX_EXPRESSION_NESTING} levels`);
    expect(text).toContain(`and ${units.MAX_EXPRESSION_NODES} operations`);
    expect(text).toContain(`at most ${units.MAX_UNIT_TERMS} units together`);
    expect(text).toContain(`at most ${units.MAX_SHEET_OPERATIONS} operations`);
  });
});

describe('quantity ranges in sheet-format.md', () => {
  it('states every range with its current value', async () => {
    const schema = await import('../../../src/lib/sheet/schema');
    const text = read('sheet-format.md').replace(/\s+/g, ' ');
    expect(text).toContain(`between -${schema.MAX_LENGTH} m and ${schema.MAX_LENGTH} m`);
    expect(text).toContain(`between -${schema.MAX_SPEED} m/s and ${schema.MAX_SPEED} m/s`);
    expect(text).toContain(`between -${schema.MAX_ANGULAR_SPEED} rad/s and ${schema.MAX_ANGULAR_SPEED} rad/s`);
    expect(text).toContain(`between -${schema.MAX_ACCELERATION} m/s^2 and ${schema.MAX_ACCELERATION} m/s^2`);
    expect(text).toContain(`between -${schema.MAX_ANGULAR_ACCELERATION} rad/s^2 and ${schema.MAX_ANGULAR_ACCELERATION} rad/s^2`);
    expect(text).toContain(`at most ${schema.MAX_TIME} s`);
    expect(text).toContain(`at most ${schema.MAX_RATE} /s`);
    expect(text).toContain(`at most ${schema.MAX_DAMPING} m`);
    expect(text).toContain(`between -${schema.MAX_ANGLE} rad and ${schema.MAX_ANGLE} rad`);
    expect(text).toContain(`at most ${Number(schema.MAX_ANGLE_TOLERANCE.toPrecision(6))} rad`);
    expect(text).toContain(`2 to ${schema.MAX_SWEEP_STEPS}`);
  });
});
