import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { MAX_ANGLE, MAX_ANGLE_TOLERANCE, MAX_SWEEP_STEPS, parseSheet } from '../../../src/lib/sheet/schema';

// The peg-tilt example: two fingers of base, pivot and roll joints, a target turned 20 deg about x.
const text = readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8');
type Joint = { angle: unknown; limits?: { min: unknown; max: unknown } };
type Sheet = {
  hand: { fingers: { joints: Joint[]; roller: { radius: unknown } }[] };
  motion: { target: { orientation: { axis: number[]; angle: unknown } }; run?: Record<string, unknown> };
  sweep?: { path: string; from: unknown; to: unknown; steps: unknown };
};
const sheet = () => JSON.parse(text) as Sheet;

function issuesOf(doc: unknown) {
  const read = parseSheet(doc);
  if (read.ok) throw new Error('the document must be refused');
  return read.issues;
}

describe('angle inputs have a stated range', () => {
  it('refuses a joint angle of 1e17 rad at its path (a double spaces angles there by 16 rad, common practice)', () => {
    const doc = sheet();
    doc.hand.fingers[0].joints[1].angle = 1e17;
    expect(issuesOf(doc)).toEqual([{ path: 'hand.fingers[0].joints[1].angle', message: `must lie between -${MAX_ANGLE} rad and ${MAX_ANGLE} rad` }]);
  });

  it('refuses a pivot limit of -1e6 deg, read through units, at its path', () => {
    const doc = sheet();
    doc.hand.fingers[1].joints[1].limits = { min: '-1e6 deg', max: '120 deg' };
    expect(issuesOf(doc).map((issue) => issue.path)).toEqual(['hand.fingers[1].joints[1].limits.min']);
  });

  it('refuses a target rotation angle of 1e9 rad at its path', () => {
    const doc = sheet();
    doc.motion.target.orientation.angle = '1e9 rad';
    expect(issuesOf(doc).map((issue) => issue.path)).toEqual(['motion.target.orientation.angle']);
  });

  it('refuses an angle tolerance of 4 rad, past pi (no orientation error is larger)', () => {
    const doc = sheet();
    doc.motion.run = { ...doc.motion.run, angleTolerance: 4 };
    const issues = issuesOf(doc);
    expect(issues.map((issue) => issue.path)).toEqual(['motion.run.angleTolerance']);
    expect(issues[0].message).toContain(`${Number(MAX_ANGLE_TOLERANCE.toPrecision(6))} rad`);
  });

  it('still accepts several turns of a joint and the example sheet as it is', () => {
    const doc = sheet();
    doc.hand.fingers[0].joints[2].angle = '10 * 360 deg';
    expect(parseSheet(doc).ok).toBe(true);
    expect(evaluateSheet(sheet()).ok).toBe(true);
  });
});

describe('sweep ends lie within the swept input\'s range', () => {
  it('refuses a sweep of a joint angle to 2000 rad at sweep.to, naming the field and its range', () => {
    const doc = sheet();
    doc.sweep = { path: '/hand/fingers/0/joints/1/angle', from: 0, to: 2000, steps: 11 };
    expect(issuesOf(doc)).toEqual([
      { path: 'sweep.to', message: `2000 is outside what hand.fingers[0].joints[1].angle accepts: must lie between -${MAX_ANGLE} rad and ${MAX_ANGLE} rad` },
    ]);
  });

  it('refuses a roller radius swept from -5 mm (a radius must be above 0) at sweep.from', () => {
    const doc = sheet();
    doc.sweep = { path: '/hand/fingers/0/roller/radius', from: '-5 mm', to: '20 mm', steps: 5 };
    const issues = issuesOf(doc);
    expect(issues.map((issue) => issue.path)).toEqual(['sweep.from']);
    expect(issues[0].message).toContain('hand.fingers[0].roller.radius');
  });

  it('refuses an angular speed swept to 1e308 rad/s, and both ends when both are out', () => {
    const doc = sheet();
    doc.sweep = { path: '/object/twist/angular/0', from: -1e308, to: 1e308, steps: 3 };
    expect(issuesOf(doc).map((issue) => issue.path)).toEqual(['sweep.from', 'sweep.to']);
  });

  it(`bounds the steps at ${MAX_SWEEP_STEPS}`, () => {
    const doc = sheet();
    doc.sweep = { path: '/hand/fingers/0/roller/radius', from: '10 mm', to: '20 mm', steps: MAX_SWEEP_STEPS + 1 };
    expect(issuesOf(doc).map((issue) => issue.path)).toEqual(['sweep.steps']);
  });

  it('accepts a sweep whose ends lie within the range, in units', () => {
    const doc = sheet();
    doc.sweep = { path: '/hand/fingers/0/joints/1/angle', from: '-90 deg', to: '90 deg', steps: 7 };
    const read = parseSheet(doc);
    expect(read.ok).toBe(true);
    if (read.ok) expect(read.doc.sweep).toEqual({ path: '/hand/fingers/0/joints/1/angle', from: -Math.PI / 2, to: Math.PI / 2, steps: 7 });
  });
});
