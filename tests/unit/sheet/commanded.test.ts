import { describe, expect, it } from 'vitest';
import { runSheet, SOLUTION_KINDS } from '../../../src/lib/kinematics';
import { commandedRates, describeCommanded } from '../../../src/lib/sheet/commanded';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { resultsCsv } from '../../../src/lib/sheet/results-csv';
import { exportedResult } from '../../../src/lib/sheet/results-json';
import { parseSheet } from '../../../src/lib/sheet/schema';
import type { CommandedSolution, SheetDocument } from '../../../src/lib/sheet/types';
import { threeFingerFinger, threeFingerSheet } from '../kinematics/three-finger-sheet';

/** The three-finger test hand, its first finger's pivot turned so that steering has something to change, under a chosen solution. */
function sheet(commanded?: CommandedSolution): SheetDocument {
  const doc = threeFingerSheet();
  doc.hand.fingers[0]!.joints[1]!.angle = 0.3;
  if (commanded) doc.commanded = commanded;
  return doc;
}

function evaluated(doc: SheetDocument) {
  const result = evaluateSheet(JSON.parse(JSON.stringify(doc)));
  if (!result.ok) throw new Error(result.error.message);
  return result.value;
}

describe('the commanded solution of a sheet', () => {
  it('defaults to steer-and-roll for a document that names none, as runs followed before the choice', () => {
    const parsed = parseSheet(JSON.parse(JSON.stringify(sheet())));
    expect(parsed.ok && parsed.doc.commanded).toBe(undefined);
    expect(evaluated(sheet()).result.commanded?.solution).toBe('steer-and-roll');
  });

  it('refuses an unknown solution at its field', () => {
    const written = JSON.parse(JSON.stringify(sheet()));
    written.commanded = 'fastest';
    const parsed = parseSheet(written);
    expect(parsed.ok ? [] : parsed.issues.map((issue) => `${issue.path}: ${issue.message}`)).toEqual([
      'commanded: expected the commanded solution: "steer-and-roll" or "full"',
    ]);
  });
});

describe('commandedRates', () => {
  it('gives a steered pivot the rate of its change over the time step: θ̇ ≈ Δθ / Δt (backward difference, common practice)', () => {
    const { doc, result } = evaluated(sheet());
    const finger = result.fingers[0]!;
    const pivot = result.commanded!.fingers[0]!.pivot!;
    expect(pivot.currentAngle).toBe(0.3);
    expect(pivot.targetAngle).toBe(finger.steer.pivotAngle);
    expect(pivot.change).toBeCloseTo(pivot.targetAngle - pivot.currentAngle, 12);
    expect(Math.abs(pivot.change)).toBeGreaterThan(1e-3);
    expect(pivot.rate).toBeCloseTo(pivot.change / doc.motion.run.dt, 9);
    const joints = result.commanded!.fingers[0]!.joints;
    expect(joints.map((j) => j.name)).toEqual(['base', 'pivot', 'roll']);
    expect(joints[1]!.rate).toBe(pivot.rate);
    // Base and roll take the steer-and-roll rates; the steer-and-roll solution itself leaves the pivot at 0 rad/s.
    expect(joints[0]!.rate).toBe(finger.steer.rates[0]);
    expect(joints[2]!.rate).toBe(finger.steer.rates[2]);
    expect(finger.steer.rates[1]).toBe(0);
  });

  it('commands the full damped least-squares rates of every finger under "full", without a pivot target', () => {
    const { result } = evaluated(sheet('full'));
    expect(result.commanded!.solution).toBe('full');
    result.commanded!.fingers.forEach((f, i) => {
      expect(f.solution).toBe('full');
      expect(f.pivot).toBe(undefined);
      expect(f.joints.map((j) => j.rate)).toEqual(result.fingers[i]!.full.rates);
    });
  });

  it('falls back to the full solution, and says so, for a finger without base, pivot and roll joints', () => {
    const doc = sheet();
    const plain = threeFingerFinger(2);
    doc.hand.fingers[2] = { ...plain, joints: plain.joints.map((joint) => ({ ...joint, role: 'other' as const })) };
    const { result } = evaluated(doc);
    expect(result.commanded!.fingers.map((f) => f.solution)).toEqual(['steer-and-roll', 'steer-and-roll', 'full']);
    expect(describeCommanded('steer-and-roll', result.commanded!.fingers)).toBe(
      'steer-and-roll (finger "finger 3": full solution, no base, pivot and roll joints)',
    );
    expect(commandedRates(doc, result).fingers[2]!.joints.map((j) => j.rate)).toEqual(result.fingers[2]!.full.rates);
  });
});

describe('runs follow the commanded solution', () => {
  it('records every finger as following the full solution under "full" and steer-and-roll by default', () => {
    for (const [choice, kind] of [[undefined, 'steer-and-roll'], ['full', 'full']] as const) {
      const parsed = parseSheet(JSON.parse(JSON.stringify({ ...sheet(choice), motion: { ...sheet().motion, run: { ...sheet().motion.run, maxTicks: 3 } } })));
      if (!parsed.ok) throw new Error('sheet does not read');
      const record = runSheet(parsed.doc);
      expect(Array.from(record.solution, (index) => SOLUTION_KINDS[index])).toEqual(Array.from(record.solution, () => kind));
    }
  });
});

describe('exports name the commanded solution', () => {
  it('writes the commanded solution, commanded rates, the pivot target, change and rate, and the full rates under their own name (CSV)', () => {
    const { doc, result } = evaluated(sheet());
    const [header, first] = resultsCsv(doc, result).split('\n').map((line) => line.split(','));
    const cell = (name: string) => first![header!.indexOf(name)];
    expect(header).toEqual(expect.arrayContaining([
      'commanded_solution', 'pivot_target_angle_rad', 'pivot_change_rad', 'pivot_rate_rad_s',
      'commanded_rate1_rad_s', 'commanded_rate2_rad_s', 'commanded_rate3_rad_s', 'full_rate1_rad_s', 'full_rate2_rad_s', 'full_rate3_rad_s',
    ]));
    expect(header!.some((name) => /^rate\d/.test(name))).toBe(false);
    const pivot = result.commanded!.fingers[0]!.pivot!;
    expect(cell('commanded_solution')).toBe('steer-and-roll');
    expect(Number(cell('pivot_rate_rad_s'))).toBe(pivot.rate);
    expect(Number(cell('commanded_rate2_rad_s'))).toBe(pivot.rate);
    expect(Number(cell('full_rate1_rad_s'))).toBe(result.fingers[0]!.full.rates[0]);
  });

  it('leaves the pivot cells empty under "full"', () => {
    const { doc, result } = evaluated(sheet('full'));
    const [header, first] = resultsCsv(doc, result).split('\n').map((line) => line.split(','));
    expect(first![header!.indexOf('commanded_solution')]).toBe('full');
    expect(first![header!.indexOf('pivot_rate_rad_s')]).toBe('');
    expect(Number(first![header!.indexOf('commanded_rate2_rad_s')])).toBe(result.fingers[0]!.full.rates[1]);
  });

  it('gives each joint its commanded rate in the results JSON, names the solution, and writes the orientation w first with named parts', () => {
    const doc = sheet();
    doc.object.pose.orientation = { w: Math.cos(0.2), x: 0, y: Math.sin(0.2), z: 0 };
    const { doc: read, result } = evaluated(doc);
    const json = JSON.parse(JSON.stringify(exportedResult(read, result)));
    expect(json.commanded.solution).toBe('steer-and-roll');
    expect(json.commanded.fingers[0].joints[1]).toEqual({ name: 'pivot', rate: result.commanded!.fingers[0]!.pivot!.rate });
    expect(Object.keys(json.object.orientation)).toEqual(['w', 'x', 'y', 'z']);
    expect([json.object.orientation.w, json.object.orientation.y]).toBeNear([Math.cos(0.2), Math.sin(0.2)], { abs: 1e-15 });
    expect(json.conventions.quaternion).toBe('w, x, y, z (scalar first)');
  });
});
