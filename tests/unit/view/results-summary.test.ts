import { describe, expect, it } from 'vitest';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { summariseResults } from '../../../src/lib/view/results-summary';

function solved(doc: SheetDocument) {
  const evaluated = evaluateSheet(doc);
  if (!evaluated.ok) throw new Error(evaluated.error.message);
  return evaluated.value.result;
}

describe('summariseResults', () => {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  const result = solved(doc);
  const summary = summariseResults(result, doc);

  it('shows the commanded rates joint by joint: steer-and-roll where the finger steers, the pivot at its change over the run\'s time step', () => {
    summary.fingers.forEach((finger, f) => {
      const solvedFinger = result.fingers[f]!;
      const roles = doc.hand.fingers[f]!.joints.map((j) => j.role);
      expect(finger.solution).toBe('steer-and-roll');
      // A steered pivot turns to its target within one time step (issue #13: "the rate that change needs at the run's time step").
      const expected = Array.from(solvedFinger.steer.rates).map((rate, k) => (roles[k] === 'pivot' ? solvedFinger.steer.pivotChange / doc.motion.run.dt : rate));
      expect(finger.joints.map((j) => j.rate)).toBeNear(expected, { abs: 0 });
      expect(finger.pivotAngle).toBe(solvedFinger.steer.pivotAngle);
      expect(finger.joints.map((j) => [j.name, j.role])).toEqual(doc.hand.fingers[f]!.joints.map((j) => [j.name, j.role]));
    });
  });

  it('follows a sheet that commands the full solution', () => {
    const full = { ...structuredClone(doc), commanded: 'full' as const };
    const other = summariseResults(solved(full), full);
    other.fingers.forEach((finger, f) => {
      expect(finger.solution).toBe('full');
      expect(finger.pivotAngle).toBeNull();
      expect(finger.joints.map((j) => j.rate)).toBeNear(Array.from(result.fingers[f]!.full.rates), { abs: 1e-15 });
    });
  });

  it('falls back to the full solution for a finger without a pivot, as runs do', () => {
    const plain = structuredClone(doc);
    plain.hand.fingers[0]!.joints = plain.hand.fingers[0]!.joints.map((joint) => (joint.role === 'pivot' ? { ...joint, role: 'other' } : joint));
    const other = summariseResults(solved(plain), plain);
    expect(other.fingers[0]!.solution).toBe('full');
    expect(other.fingers[0]!.pivotAngle).toBeNull();
    expect(other.fingers[0]!.joints.map((j) => j.rate)).toBeNear(Array.from(solved(plain).fingers[0]!.full.rates), { abs: 1e-15 });
  });

  it('names the worst warning of each finger with the number raised', () => {
    summary.fingers.forEach((finger, f) => {
      const raised = result.warnings.filter((w) => w.finger === f);
      expect(finger.worst?.count ?? 0).toBe(raised.length);
      if (raised.length > 0) expect(raised.map((w) => w.severity)).toContain(finger.worst!.severity);
    });
  });
});
