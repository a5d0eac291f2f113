import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { glMatrix, quat as glQuat, type vec3 as GlVec3 } from 'gl-matrix';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { HAND_TEMPLATES, createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { RunSettings, SheetDocument } from '../../../src/lib/sheet/types';
import { ROTATION_METRICS } from '../../../src/lib/kinematics/metrics';
import { SOLUTION_KINDS, runScene, runSheet, toPlainRunRecord, warningsAt } from '../../../src/lib/kinematics/run';
import { createResult, createScene, solveScene } from '../../../src/lib/kinematics/scene';
import { SEVERITY_LEVELS, WARNING_CATALOGUE, WARNING_CODES } from '../../../src/lib/kinematics/warnings';
import { threeFingerSheet } from './three-finger-sheet';

// References: the closed loop e' = -g e under forward-Euler steps of dt shrinks the error by (1 - g dt) per tick
// (discrete first-order system; Astrom & Murray, "Feedback Systems", 2nd ed., Ch. 6, common practice), and it stays
// exact for the rotation because every step turns about the same axis (exp(a w) exp(b w) = exp((a + b) w),
// Lynch & Park, "Modern Robotics", Sec. 3.2.3). Orientations are rebuilt with gl-matrix quat.setAxisAngle.
glMatrix.setMatrixArrayType(Array);

const PHI3 = ROTATION_METRICS.findIndex((m) => m.key === 'phi3');
const PHI6 = ROTATION_METRICS.findIndex((m) => m.key === 'phi6');
const M = ROTATION_METRICS.length;

/** Tri-radial template on a 30 mm sphere; target a 45 degree turn about z and a 4 mm shift. */
function sheet(): SheetDocument {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  const [x, y, z] = doc.object.pose.position;
  doc.motion.target.position = [x + 0.003, y - 0.002, z + 0.002];
  return doc;
}

function settings(overrides: Partial<RunSettings> = {}): RunSettings {
  return { gain: 2, dt: 0.005, maxTicks: 400, positionTolerance: 1e-4, angleTolerance: 1e-3, stopOnSingular: false, ...overrides };
}

describe('runSheet', () => {
  it('shrinks position and geodesic errors by (1 - g dt) per tick, and the orientation follows exp((theta0 - theta_k) z) q0 by gl-matrix', () => {
    const doc = sheet();
    const s = settings({ positionTolerance: 1e-12, angleTolerance: 1e-12, maxTicks: 200 });
    const r = runSheet(doc, { settings: s });
    const factor = 1 - s.gain * s.dt;
    const theta0 = Math.PI / 4;
    const e0 = Math.hypot(0.003, 0.002, 0.002);
    expect(r.tickCount).toBe(200);
    for (const k of [0, 1, 10, 100, 199]) {
      expect(r.positionError[k]).toBeCloseTo(e0 * factor ** k, 12);
      expect(r.orientationError[M * k + PHI6]).toBeCloseTo(theta0 * factor ** k, 12);
      const turned = theta0 - theta0 * factor ** k;
      const expected = glQuat.setAxisAngle(glQuat.create(), [0, 0, 1] as GlVec3, turned) as number[];
      const q = Array.from(r.orientation.subarray(4 * k, 4 * k + 4));
      const sign = Math.sign(q[3]!) * Math.sign(expected[3]!);
      expect(q.map((x) => x * sign)).toBeNear(expected, { digits: 12 });
    }
  });

  it('commands gain times the measured error as the twist', () => {
    const s = settings({ maxTicks: 3 });
    const r = runSheet(sheet(), { settings: s });
    expect(Array.from(r.twist.subarray(0, 3)).map((v) => v / s.gain)).toEqual(
      [0.003, -0.002, 0.002].map((d) => expect.closeTo(d, 12) as unknown as number),
    );
    expect(r.twist[5]! / s.gain).toBeCloseTo(Math.PI / 4, 12);
    expect(Math.abs(r.twist[3]!) + Math.abs(r.twist[4]!)).toBeLessThan(1e-15);
  });

  it('stops at the first tick k with theta0 (1 - g dt)^k within both tolerances, so tickCount = k + 1', () => {
    const s = settings({ positionTolerance: 1e-4, angleTolerance: 1e-3, maxTicks: 5000 });
    const r = runSheet(sheet(), { settings: s });
    const factor = 1 - s.gain * s.dt;
    const kAngle = Math.ceil(Math.log(s.angleTolerance / (Math.PI / 4)) / Math.log(factor));
    const kPosition = Math.ceil(Math.log(s.positionTolerance / Math.hypot(0.003, 0.002, 0.002)) / Math.log(factor));
    expect(r.stopReason).toBe('converged');
    expect(r.tickCount).toBe(Math.max(kAngle, kPosition) + 1);
  });

  it('integrates joint angles by the recorded rates times dt', () => {
    const s = settings({ maxTicks: 20 });
    const r = runSheet(sheet(), { settings: s });
    r.jointCounts.forEach((n, i) => {
      const angles = r.jointAngles[i]!;
      const rates = r.jointRates[i]!;
      for (let k = 0; k + 1 < r.tickCount; k++) {
        for (let j = 0; j < n; j++) expect(angles[(k + 1) * n + j]).toBeCloseTo(angles[k * n + j]! + rates[k * n + j]! * s.dt, 14);
      }
    });
    expect(r.jointRates.some((column) => column.some((x) => Math.abs(x) > 1e-3))).toBe(true);
  });

  it('records Phi2..Phi6 per tick with Phi6 = 2 Phi3 (Huynh 2009) and columns of tickCount rows', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 50 }) });
    for (let k = 0; k < r.tickCount; k++) expect(r.orientationError[M * k + PHI6]).toBeCloseTo(2 * r.orientationError[M * k + PHI3]!, 14);
    expect([r.time.length, r.position.length, r.orientation.length, r.twist.length, r.orientationError.length]).toEqual([50, 150, 200, 300, 50 * M]);
    expect(r.time[49]).toBeCloseTo(49 * 0.005, 15);
    expect(r.jointAngles.map((c) => c.length)).toEqual(r.jointCounts.map((n) => 50 * n));
  });

  it('stops on a tick-limit, and on a singular warning only when stopOnSingular is set', () => {
    const limited = runSheet(sheet(), { settings: settings({ maxTicks: 7 }) });
    expect([limited.stopReason, limited.tickCount]).toEqual(['tick-limit', 7]);
    // sigma_min / sigma_max < 1 for any Jacobian with unequal singular values, so this threshold always warns.
    const strict = sheet();
    strict.solver.singularRatio = 0.999999;
    const stopped = runSheet(strict, { settings: settings({ stopOnSingular: true }) });
    expect([stopped.stopReason, stopped.tickCount]).toEqual(['singular', 1]);
    expect(warningsAt(stopped, 0)).toContain('JACOBIAN_NEAR_RANK_LOSS');
    expect(SEVERITY_LEVELS[stopped.worstSeverity[0]!]).toBe('singular');
    const continued = runSheet(strict, { settings: settings({ maxTicks: 7, stopOnSingular: false }) });
    expect([continued.stopReason, continued.tickCount]).toEqual(['tick-limit', 7]);
  });

  it('decodes warning masks against WARNING_CODES, the catalogue keys', () => {
    expect([...WARNING_CODES].sort()).toEqual(Object.keys(WARNING_CATALOGUE).sort());
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 2 }) });
    for (const code of warningsAt(r, 0)) expect(WARNING_CATALOGUE[code]).toBeDefined();
  });

  it('adds seeded noise of the requested standard deviation to the measured pose only; same seed, same record', () => {
    const noise = { seed: 17, position: 1e-4, angle: 2e-3 };
    const s = settings({ maxTicks: 3000, positionTolerance: -1, angleTolerance: -1, noise });
    const a = runSheet(sheet(), { settings: s });
    const b = runSheet(sheet(), { settings: s });
    const c = runSheet(sheet(), { settings: { ...s, noise: { ...noise, seed: 18 } } });
    expect(Array.from(a.measuredPosition)).toEqual(Array.from(b.measuredPosition));
    expect(Array.from(a.measuredPosition)).not.toEqual(Array.from(c.measuredPosition));
    let sumSquares = 0;
    let angleSquares = 0;
    for (let k = 0; k < a.tickCount; k++) {
      for (let i = 0; i < 3; i++) sumSquares += (a.measuredPosition[3 * k + i]! - a.position[3 * k + i]!) ** 2;
      const q = a.orientation.subarray(4 * k, 4 * k + 4);
      const m = a.measuredOrientation.subarray(4 * k, 4 * k + 4);
      angleSquares += glQuat.getAngle(q as unknown as glQuat, m as unknown as glQuat) ** 2;
    }
    // Per-axis standard deviation; the rotation angle of three independent N(0, s^2) axes has E[angle^2] = 3 s^2.
    expect(Math.sqrt(sumSquares / (3 * a.tickCount))).toBeCloseTo(noise.position, 5);
    expect(Math.sqrt(angleSquares / (3 * a.tickCount)) / noise.angle).toBeGreaterThan(0.95);
    expect(Math.sqrt(angleSquares / (3 * a.tickCount)) / noise.angle).toBeLessThan(1.05);
  });

  it('without noise records the measured pose as the truth itself, also after the columns grow past their first 16,384 ticks', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 17_000, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false }) });
    expect(r.tickCount).toBe(17_000);
    expect(r.measuredPosition.buffer).toBe(r.position.buffer);
    expect(r.measuredOrientation.buffer).toBe(r.orientation.buffer);
    expect(r.measuredPosition.length).toBe(3 * r.tickCount);
    expect(r.measuredOrientation.length).toBe(4 * r.tickCount);
  });

  it('reports progress every N ticks', () => {
    const calls: Array<[number, number]> = [];
    runSheet(sheet(), { settings: settings({ maxTicks: 25, positionTolerance: -1, angleTolerance: -1 }), progressEvery: 10, onProgress: (done, max) => calls.push([done, max]) });
    expect(calls).toEqual([
      [10, 25],
      [20, 25],
    ]);
  });

  it('grows its columns past the initial capacity without losing ticks', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 20_000, positionTolerance: -1, angleTolerance: -1 }) });
    expect(r.tickCount).toBe(20_000);
    expect(r.time[16_384]).toBeCloseTo(16_384 * 0.005, 9);
    expect(r.time[19_999]).toBeCloseTo(19_999 * 0.005, 9);
    expect(r.orientationError[M * 19_999 + PHI6]).toBeLessThanOrEqual(r.orientationError[M * 16_383 + PHI6]!);
    expect(Number.isFinite(r.position[3 * 19_999 + 2]!)).toBe(true);
  });

  it('follows steer-and-roll where available: the pivot jumps to the steered angle, recorded as pivotChange / dt', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 5 }) });
    expect(r.solution.length).toBe(3 * 5);
    expect([...r.solution].every((kind) => SOLUTION_KINDS[kind] === 'steer-and-roll')).toBe(true);
    const unsteered = sheet();
    unsteered.hand.fingers[0].joints[1].role = 'other';
    const u = runSheet(unsteered, { settings: settings({ maxTicks: 2 }) });
    expect([SOLUTION_KINDS[u.solution[0]!], SOLUTION_KINDS[u.solution[1]!]]).toEqual(['full', 'steer-and-roll']);
  });

  it('leaves the document untouched', () => {
    const doc = sheet();
    const before = JSON.stringify(doc);
    runSheet(doc, { settings: settings({ maxTicks: 10 }) });
    expect(JSON.stringify(doc)).toBe(before);
  });
});

describe('runScene', () => {
  it('leaves the scene in the final state, so a second run continues where the first stopped', () => {
    const doc = sheet();
    const s = settings({ maxTicks: 30, positionTolerance: -1, angleTolerance: -1 });
    const scene = createScene(doc);
    const first = runScene(scene, s);
    const second = runScene(scene, s);
    const whole = runSheet(doc, { settings: { ...s, maxTicks: 60 } });
    // The second run starts one tick after the first one's last record.
    expect(second.positionError[0]).toBeCloseTo(whole.positionError[30]!, 15);
    expect(second.orientationError[PHI6]).toBeCloseTo(whole.orientationError[M * 30 + PHI6]!, 14);
    expect(first.tickCount + second.tickCount).toBe(whole.tickCount);
  });
});

describe('warningsAt', () => {
  it('lists the codes whose bits are set, in WARNING_CODES order', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 1 }) });
    r.warningMask[0] = (1 << 0) | (1 << 3);
    expect(warningsAt(r, 0)).toEqual([WARNING_CODES[0], WARNING_CODES[3]]);
  });
});

describe('toPlainRunRecord', () => {
  it('survives JSON round trip with every column as an array of the recorded length and the legends attached', () => {
    const r = runSheet(sheet(), { settings: settings({ maxTicks: 4 }) });
    const plain = JSON.parse(JSON.stringify(toPlainRunRecord(r))) as ReturnType<typeof toPlainRunRecord>;
    expect(plain.time).toEqual(Array.from(r.time));
    expect(plain.orientationError.length).toBe(4 * M);
    expect(plain.jointRates.map((c) => c.length)).toEqual(r.jointCounts.map((n) => 4 * n));
    expect(plain.warningCodes).toEqual([...WARNING_CODES]);
    expect(plain.solutionKinds).toEqual([...SOLUTION_KINDS]);
    expect(plain.solution).toEqual(Array.from(r.solution));
    expect(plain.orientationMetrics).toEqual(ROTATION_METRICS.map((m) => m.key));
  });
});

const sheetsDir = new URL('../../../content/sheets/', import.meta.url);
const shippedExamples = readdirSync(sheetsDir)
  .filter((file) => file.endsWith('.json'))
  .sort()
  .map((file) => {
    const parsed = parseSheet(JSON.parse(readFileSync(new URL(file, sheetsDir), 'utf8')));
    if (!parsed.ok) throw new Error(`${file} does not parse`);
    return [file, parsed.doc] as const;
  });
const templateSheets = HAND_TEMPLATES.map((t) => [`template ${t.id}`, createSheetFromTemplate(t.id, { kind: 'sphere', radius: 0.03 })] as const);
/** The mounting review is built to be singular at the start: one contact sits on its roll axis, where rolling cannot move it. */
const GENUINELY_SINGULAR = 'line4-retrofit-finger-review.json';

describe('regression on the shipped examples: runs toward the target proceed', () => {
  it.each([...shippedExamples, ...templateSheets].filter(([name]) => name !== GENUINELY_SINGULAR))(
    '%s converges with its own run settings (stopOnSingular as shipped) and the orientation error falls',
    (_name, doc) => {
      const r = runSheet(doc);
      expect(r.stopReason).toBe('converged');
      expect(r.tickCount).toBeGreaterThan(1);
      const first = r.orientationError[PHI6]!, last = r.orientationError[M * (r.tickCount - 1) + PHI6]!;
      expect(last).toBeLessThan(first);
      expect(last).toBeLessThanOrEqual(doc.motion.run.angleTolerance);
      expect([...r.worstSeverity].some((level) => SEVERITY_LEVELS[level] === 'singular')).toBe(false);
    },
  );

  it(`${GENUINELY_SINGULAR} stops at tick 1 because a contact sits on its roll axis`, () => {
    const doc = shippedExamples.find(([name]) => name === GENUINELY_SINGULAR)![1];
    const r = runSheet(doc);
    expect([r.stopReason, r.tickCount]).toEqual(['singular', 1]);
    expect(warningsAt(r, 0)).toEqual(expect.arrayContaining(['CONTACT_NEAR_ROLL_AXIS', 'JACOBIAN_NEAR_RANK_LOSS']));
  });
});

describe('steered run toward a rotation about a known axis', () => {
  // Test hand around a 40 mm ball, turned 0.5 rad about x. Finger 2 touches at x = 0.04 (cos 120 deg, sin 120 deg, 0),
  // where the surface moves along z, across the roll direction -rho e_t of the roll axis z: the pivot (axis e_r) must
  // turn the roll axis by a quarter turn. The ball turns about its centre, so the contacts stay put and the roller
  // rolls the same arc as the surface: roll angle = theta * (0.04 sin 120 deg) / rho (rolling without slipping,
  // arc lengths equal; common practice).
  const theta0 = 0.5;
  const doc = threeFingerSheet();
  doc.motion.target = { position: [0, 0, 0], orientation: { w: Math.cos(theta0 / 2), x: Math.sin(theta0 / 2), y: 0, z: 0 } };
  const s = settings({ maxTicks: 3000, stopOnSingular: true });
  const r = runSheet(doc, { settings: s });
  const last = r.tickCount - 1;

  it('converges without a singular warning, each finger following steer and roll', () => {
    expect(r.stopReason).toBe('converged');
    expect([...r.worstSeverity].some((level) => SEVERITY_LEVELS[level] === 'singular')).toBe(false);
    expect([...r.solution].every((kind) => SOLUTION_KINDS[kind] === 'steer-and-roll')).toBe(true);
    for (let k = 0; k < r.tickCount; k++) expect(warningsAt(r, k)).not.toContain('CONTACT_LOST');
  });

  it('ends at exp((theta0 - theta_k) x) by gl-matrix, within the angle tolerance of the target', () => {
    const turned = theta0 - theta0 * (1 - s.gain * s.dt) ** last;
    const expected = glQuat.setAxisAngle(glQuat.create(), [1, 0, 0] as GlVec3, turned) as number[];
    const q = Array.from(r.orientation.subarray(4 * last, 4 * last + 4));
    expect(q).toBeNear(expected, { digits: 12 });
    const target = glQuat.setAxisAngle(glQuat.create(), [1, 0, 0] as GlVec3, theta0);
    expect(glQuat.getAngle(target, q as unknown as glQuat)).toBeLessThanOrEqual(s.angleTolerance);
  });

  it('turns the pivot of finger 2 a quarter turn in the first tick, recorded as (pi / 2) / dt, and keeps it', () => {
    const pivot = (k: number) => r.jointAngles[1]![3 * k + 1]!;
    expect(Math.abs(r.jointRates[1]![1]! * s.dt)).toBeCloseTo(Math.PI / 2, 9);
    expect(Math.abs(pivot(1))).toBeCloseTo(Math.PI / 2, 9);
    expect(pivot(last)).toBeCloseTo(pivot(1), 9);
  });

  it('flags the quarter-turn pivot jump of finger 2 as RATE_LIMIT_EXCEEDED against a 100 rad/s limit ((pi / 2) / 0.005 s = 314 rad/s), only on that tick', () => {
    const limited = structuredClone(doc);
    limited.hand.fingers[1]!.joints[1]!.rateLimit = 100;
    const l = runSheet(limited, { settings: s });
    expect(warningsAt(l, 0)).toContain('RATE_LIMIT_EXCEEDED');
    expect(SEVERITY_LEVELS[l.worstSeverity[0]!]).not.toBe('none');
    for (let k = 1; k < l.tickCount; k++) expect(warningsAt(l, k)).not.toContain('RATE_LIMIT_EXCEEDED');
    expect(warningsAt(r, 0)).not.toContain('RATE_LIMIT_EXCEEDED');
  });

  it('rolls finger 2 through the surface arc over rho: theta (0.04 sin 120 deg) / 0.012', () => {
    const turned = theta0 - theta0 * (1 - s.gain * s.dt) ** last;
    const roll = r.jointAngles[1]![3 * last + 2]! - r.jointAngles[1]![2]!;
    expect(Math.abs(roll)).toBeCloseTo((turned * 0.04 * Math.sin((2 * Math.PI) / 3)) / 0.012, 6);
  });
});

describe("solveScene with detail 'run'", () => {
  // Independent second route: the full 'report' solve of the same state; a run must record exactly what it would.
  it.each([...shippedExamples, ...templateSheets])('%s: same rates, pivot angles, warnings and grasp rank as the full solve along its run', (_, doc) => {
    const settings = { ...doc.motion.run, maxTicks: 40, positionTolerance: -1, angleTolerance: -1 };
    const record = runSheet(doc, { settings });
    const scene = createScene(doc);
    const viaRun = createResult(scene), viaReport = createResult(scene);
    for (let tick = 0; tick < record.tickCount; tick += 7) {
      scene.object.position.set(record.position.subarray(3 * tick, 3 * tick + 3));
      scene.object.orientation.set(record.orientation.subarray(4 * tick, 4 * tick + 4));
      scene.object.linearVelocity.set(record.twist.subarray(6 * tick, 6 * tick + 3));
      scene.object.angularVelocity.set(record.twist.subarray(6 * tick + 3, 6 * tick + 6));
      scene.fingers.forEach((f, i) => f.angles.set(record.jointAngles[i].subarray(f.jointCount * tick, f.jointCount * (tick + 1))));
      solveScene(scene, viaRun, 'run');
      solveScene(scene, viaReport, 'report');
      viaReport.fingers.forEach((expected, i) => {
        const got = viaRun.fingers[i];
        expect(Array.from(got.full.rates)).toEqual(Array.from(expected.full.rates));
        expect(Array.from(got.steer.rates)).toEqual(Array.from(expected.steer.rates));
        expect(got.steer.pivotAngle).toEqual(expected.steer.pivotAngle);
        expect(got.rankRatio).toEqual(expected.rankRatio);
      });
      expect(viaRun.warnings.map((w) => [w.code, w.finger, w.joint, w.value, w.threshold])).toEqual(
        viaReport.warnings.map((w) => [w.code, w.finger, w.joint, w.value, w.threshold]),
      );
      expect(viaRun.worstSeverity).toBe(viaReport.worstSeverity);
      expect(viaRun.grasp.rank).toBe(viaReport.grasp.rank);
    }
  });
});
