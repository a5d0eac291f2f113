import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { WARNING_CATALOGUE, solveSheet, type WarningCode } from '../../../src/lib/kinematics/index';
import { parseSheet } from '../../../src/lib/sheet/schema';
import type { ObjectShape } from '../../../src/lib/sheet/types';

const sheetsDir = new URL('../../../content/sheets/', import.meta.url);
const files = readdirSync(sheetsDir).filter((f) => f.endsWith('.json')).sort();
const docs = files.map((file) => {
  const parsed = parseSheet(JSON.parse(readFileSync(new URL(file, sheetsDir), 'utf8')));
  if (!parsed.ok) throw new Error(`${file}: ${parsed.issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`);
  return [file, parsed.doc] as const;
});

describe('example sheets (content/sheets)', () => {
  it('are at least six, all of one scenario, covering every object shape and 2- to 5-finger hands', () => {
    expect(files.length).toBeGreaterThanOrEqual(6);
    for (const [, doc] of docs) expect(doc.description.startsWith('Line 4 reorientation cell.')).toBe(true);
    const kinds = new Set<ObjectShape['kind']>(docs.map(([, doc]) => doc.object.shape.kind));
    expect([...kinds].sort()).toEqual(['box', 'capsule', 'cylinder', 'ellipsoid', 'sphere']);
    const fingerCounts = new Set(docs.map(([, doc]) => doc.hand.fingers.length));
    for (const n of [2, 3, 4, 5]) expect(fingerCounts.has(n)).toBe(true);
  });

  it.each(docs)('%s solves with finite joint rates', (_file, doc) => {
    const result = solveSheet(doc);
    expect(result.fingers).toHaveLength(doc.hand.fingers.length);
    for (const finger of result.fingers) {
      for (const rate of finger.full.rates) expect(Number.isFinite(rate)).toBe(true);
    }
  });

  it('provoke every warning code of the catalogue between them', () => {
    const raised = new Set<WarningCode>();
    for (const [, doc] of docs) for (const warning of solveSheet(doc).warnings) raised.add(warning.code);
    const missing = (Object.keys(WARNING_CATALOGUE) as WarningCode[]).filter((code) => !raised.has(code));
    expect(missing).toEqual([]);
  });
});
