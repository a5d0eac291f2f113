import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readSheetFile } from '../../../src/lib/server/sheet-files';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';

// Inputs far outside what a hand can hold used to solve to NaN, infinite or silently zero
// results; they are refused with the field's path and the accepted range.
const text = readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8');
type Sheet = {
  object: { shape: { radius: unknown }; twist: { angular: unknown[]; linear: unknown[] } };
  solver?: Record<string, unknown>;
};
const sheet = () => JSON.parse(text) as Sheet;

function issuesOf(doc: unknown) {
  const evaluated = evaluateSheet(doc);
  if (evaluated.ok) throw new Error('the document must be refused');
  return evaluated.error.issues;
}

describe('inputs outside physically meaningful ranges', () => {
  it('refuses an angular speed of 1e308 rad/s at its path, naming the range', () => {
    const doc = sheet();
    doc.object.twist.angular[0] = 1e308;
    const issues = issuesOf(doc);
    expect(issues.map((i) => i.path)).toEqual(['object.twist.angular[0]']);
    expect(issues[0]!.message).toBe('must lie between -10000 rad/s and 10000 rad/s');
  });

  it('refuses an object radius of 1e300 m at its path, naming the range', () => {
    const doc = sheet();
    doc.object.shape.radius = 1e300;
    const issues = issuesOf(doc);
    expect(issues.map((i) => i.path)).toEqual(['object.shape.radius']);
    expect(issues[0]!.message).toMatch(/10 m/);
  });

  it('refuses a damping of 1e200 at its path', () => {
    const doc = sheet();
    doc.solver = { damping: 1e200 };
    const issues = issuesOf(doc);
    expect(issues.map((i) => i.path)).toEqual(['solver.damping']);
  });

  it('refuses a speed of 1e300 m/s at its path', () => {
    const doc = sheet();
    doc.object.twist.linear[2] = '1e300 mm/s';
    expect(issuesOf(doc).map((i) => i.path)).toEqual(['object.twist.linear[2]']);
  });

  it('still reads every example sheet', () => {
    const dir = new URL('../../../content/sheets/', import.meta.url);
    const names = readdirSync(dir).filter((name) => name.endsWith('.json'));
    expect(names.length).toBeGreaterThan(0);
    for (const name of names) {
      const evaluated = evaluateSheet(JSON.parse(readFileSync(new URL(name, dir), 'utf8')));
      expect(evaluated.ok, name).toBe(true);
    }
  });
});

describe('outputs that are not defined rather than not finite', () => {
  function withoutRole(role: string): unknown {
    const doc = JSON.parse(text) as { hand: { fingers: { joints: { role: string }[] }[] } };
    doc.hand.fingers[0]!.joints = doc.hand.fingers[0]!.joints.filter((joint) => joint.role !== role);
    return doc;
  }

  it('solves a finger without a roll joint, whose contact has no latitude or longitude on the roller', () => {
    // A roller without a roll axis has no equator or meridian to measure from (common practice:
    // latitude and longitude need a polar axis), so the two are undefined, not a failed solve.
    const evaluated = evaluateSheet(withoutRole('roll'));
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const finger = evaluated.value.result.fingers[0]!;
    expect(JSON.parse(JSON.stringify(finger.contact))).toMatchObject({ latitude: null, longitude: null, rollAxisDistance: null });
    expect(finger.steer.available).toBe(false);
    expect(finger.full.rates.every(Number.isFinite)).toBe(true);
  });

  it.each(['pivot', 'base'])('solves a finger without a %s joint: steer-and-roll does not apply, the full solution does', (role) => {
    const evaluated = evaluateSheet(withoutRole(role));
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const finger = evaluated.value.result.fingers[0]!;
    expect(finger.steer.available).toBe(false);
    expect(finger.full.rates.every(Number.isFinite)).toBe(true);
  });

  it('still refuses a NaN among the numbers that every finger has', () => {
    const doc = withoutRole('roll') as { object: { twist: { angular: unknown[] } } };
    doc.object.twist.angular[0] = 1e308;
    expect(evaluateSheet(doc).ok).toBe(false);
  });
});

describe('non-finite literals in a sheet file', () => {
  it('locates a NaN literal at its own line and column', () => {
    const read = readSheetFile('{\n  "format": "slipless.sheet",\n  "damping": NaN,\n  "title": "a"\n}\n');
    expect(read.ok).toBe(false);
    if (read.ok) return;
    expect(read.stage).toBe('syntax');
    expect(read.issues[0]).toMatchObject({ line: 3, column: 14 });
  });

  it('locates an Infinity literal at its own line and column', () => {
    const read = readSheetFile('{\n  "format": "slipless.sheet",\n  "radius": -Infinity\n}\n');
    expect(read.ok).toBe(false);
    if (read.ok) return;
    expect(read.issues[0]).toMatchObject({ line: 3, column: 13 });
  });
});
