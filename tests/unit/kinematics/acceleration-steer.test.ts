import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  createScene, setJointAngles, setObjectPose, setObjectTwist, sheetCurvature, solveAccelerations, solveScene, solveSheet, solveSteerAcceleration,
  type FingerResult,
} from '../../../src/lib/kinematics/index';
import { createRandom, nextUniform, type RandomSource } from '../../../src/lib/kinematics/random';
import { parseSheet } from '../../../src/lib/sheet/schema';
import type { FingerInput, ObjectAcceleration, SheetDocument } from '../../../src/lib/sheet/types';
import { integrateOrientation } from './acceleration-trajectory';
import { threeFingerSheet } from './three-finger-sheet';

type V3 = [number, number, number];

const norm = (v: ArrayLike<number>) => Math.hypot(...Array.from(v));
const unit = (v: number[]): V3 => {
  const l = norm(v);
  return [v[0] / l, v[1] / l, v[2] / l];
};
const cross = (a: ArrayLike<number>, b: ArrayLike<number>): V3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];

/** Solves a sheet's velocities and feed-forward as an evaluation does: curvature first, then the accelerations. */
function feedForward(doc: SheetDocument) {
  const solved = solveSheet(doc);
  return solveAccelerations(solved, doc.object.acceleration, doc.solver, sheetCurvature(doc, solved), doc.hand.fingers);
}

/** The document with every pivot set to its steered angle, re-solved until the steering leaves no change (the finger stands steered). */
function steered(doc: SheetDocument): SheetDocument {
  const out: SheetDocument = structuredClone(doc);
  for (let pass = 0; pass < 20; pass++) {
    const fingers = solveSheet(out).fingers;
    if (fingers.every((f) => !f.steer.available || Math.abs(f.steer.pivotChange) < 1e-13)) break;
    fingers.forEach((f, i) => {
      const pivot = out.hand.fingers[i].joints.findIndex((j) => j.role === 'pivot');
      if (f.steer.available && pivot >= 0) out.hand.fingers[i].joints[pivot].angle = f.steer.pivotAngle;
    });
  }
  return out;
}

/**
 * Moves the object with its twist and acceleration (orientation integrated by RK4, independent of the core) and finger i's joints
 * with the steer-and-roll rates, the pivot at the feed-forward's pivot rate, plus half the base and roll accelerations times t^2,
 * then solves the velocities again at t = +-h and returns the central differences of the base rates, the roll rate and the steered
 * pivot angle: d/dt of the steer-and-roll solution along the motion, with no acceleration formula used (common practice).
 */
function steerRatesAStepLater(doc: SheetDocument, finger: FingerResult, i: number, h: number) {
  const steer = finger.acceleration!.steer;
  const q0 = Array.from(finger.jointAngles);
  const qd = Array.from(finger.steer.rates);
  qd[steer.pivotJoint] = steer.pivotRate;
  const qdd = q0.map(() => 0);
  finger.steer.baseJoints.forEach((k, j) => { qdd[k] = steer.baseAccelerations[j]; });
  qdd[steer.rollJoint] = steer.rollAcceleration;
  const p0 = doc.object.pose.position, v = doc.object.twist.linear, omega = doc.object.twist.angular as V3;
  const acceleration = doc.object.acceleration ?? { linear: [0, 0, 0], angular: [0, 0, 0] };
  const a = acceleration.linear, alpha = acceleration.angular as V3;
  const o = doc.object.pose.orientation;
  const scene = createScene(doc);
  const later = (t: number) => {
    setObjectPose(scene, p0.map((p, c) => p + v[c] * t + (a[c] * t * t) / 2), integrateOrientation([o.x, o.y, o.z, o.w], omega, alpha, t));
    setObjectTwist(scene, v.map((x, c) => x + a[c] * t), omega.map((x, c) => x + alpha[c] * t));
    setJointAngles(scene, i, q0.map((q, k) => q + qd[k] * t + (qdd[k] * t * t) / 2));
    const s = solveScene(scene).fingers[i].steer;
    return { baseRates: Array.from(s.baseRates), rollRate: s.rollRate, pivotAngle: s.pivotAngle, pivotChange: s.pivotChange, remainder: Array.from(s.remainder) };
  };
  const [plus, minus] = [later(h), later(-h)];
  return {
    plus, minus,
    baseAccelerations: plus.baseRates.map((x, j) => (x - minus.baseRates[j]) / (2 * h)),
    rollAcceleration: (plus.rollRate - minus.rollRate) / (2 * h),
    pivotRate: (plus.pivotAngle - minus.pivotAngle) / (2 * h),
    remainderRate: plus.remainder.map((x, c) => (x - minus.remainder[c]) / (2 * h)),
  };
}

// Central differences with h = 1e-4 s: truncation about h^2 times the third derivative over 6, cancelled to order h^4 by
// Richardson extrapolation, while rounding stays near 1e-16 / h of the rates (common practice); the step check below
// confirms the second-order convergence the extrapolation relies on.
const STEP = 1e-4;

/** Checks finger i's steer-and-roll feed-forward against the re-solved velocity solution; returns the feed-forward's size. */
function expectMatchesFiniteDifferences(doc: SheetDocument, i: number, h = STEP): number {
  const f = feedForward(doc).fingers[i];
  const steer = f.acceleration!.steer;
  expect(steer.status).toBe('defined');
  // Richardson extrapolation of the steps h and h / 2 cancels the h^2 truncation of the central difference (common practice).
  const [coarse, fine] = [steerRatesAStepLater(doc, f, i, h), steerRatesAStepLater(doc, f, i, h / 2)];
  const extrapolate = (c: number, d: number) => (4 * d - c) / 3;
  const measured = {
    pivotRate: extrapolate(coarse.pivotRate, fine.pivotRate),
    rollAcceleration: extrapolate(coarse.rollAcceleration, fine.rollAcceleration),
    baseAccelerations: coarse.baseAccelerations.map((x, j) => extrapolate(x, fine.baseAccelerations[j])),
  };
  const size = norm([steer.pivotRate, steer.rollAcceleration, ...steer.baseAccelerations]);
  // Within the touching band the contact-point velocities are off by about the gap times the relative curvature, relative
  // (acceleration.md, "Gap"): a demo sheet's roller may stand tens of micrometres off the surface.
  const curvature = sheetCurvature(doc, solveSheet(doc))[i].relative.principalCurvatures?.[0] ?? 0;
  const tolerance = { abs: (1e-6 + 2 * Math.abs(f.contact.gap) * curvature) * Math.max(size, 1e-3) };
  expect(measured.pivotRate).toBeNear(steer.pivotRate, tolerance);
  expect(measured.rollAcceleration).toBeNear(steer.rollAcceleration, tolerance);
  expect(measured.baseAccelerations).toBeNear(Array.from(steer.baseAccelerations), tolerance);
  return size;
}

/** A one-finger sheet around a 40 mm ball, drawn from the seed (numbers invented for tests): one or two base joints, a pivot through the ball roller's centre near the normal, a roll axis across it. */
function randomSheet(random: RandomSource, baseCount: number): SheetDocument {
  const between = (low: number, high: number) => low + (high - low) * nextUniform(random);
  const vector = (size: number): V3 => [between(-size, size), between(-size, size), between(-size, size)];
  const toward = unit([between(-1, 1), between(-1, 1), between(-0.6, 0.6)]);
  const rho = between(0.008, 0.015);
  const center = toward.map((c) => c * (0.04 + rho)) as V3;
  // The pivot passes through the roller centre, tilted up to ~17 degrees off the normal, so its column is tangential.
  const pivotAxis = unit(toward.map((c, k) => -c + between(-0.3, 0.3) * (k === 2 ? 1 : 0.5)));
  const across = unit(cross(pivotAxis, vector(1)));
  const tangent = unit(cross(toward, [0, 0, 1]));
  const bases = Array.from({ length: baseCount }, (_, k) => ({
    name: `base ${k + 1}`, role: 'base' as const,
    axis: unit(tangent.map((c, m) => c + between(-0.3, 0.3) + (k === 1 ? [0, 0, 0.8][m] : 0))),
    point: center.map((c, m) => c * 1.8 + between(-0.02, 0.02) - (m === 2 ? 0.05 : 0)) as V3, angle: 0,
  }));
  const finger: FingerInput = {
    name: 'random',
    joints: [...bases, { name: 'pivot', role: 'pivot', axis: pivotAxis, point: center, angle: 0 }, { name: 'roll', role: 'roll', axis: across, point: center, angle: 0 }],
    roller: { kind: 'sphere', radius: rho, center },
  };
  const base = threeFingerSheet();
  const acceleration: ObjectAcceleration = { linear: vector(0.5), angular: vector(3) };
  return {
    ...base,
    object: { ...base.object, twist: { linear: vector(0.03), angular: vector(1) }, acceleration },
    hand: { name: 'random hand', fingers: [finger] },
    solver: { ...base.solver, damping: 0 },
  };
}

describe('steer-and-roll feed-forward against the re-solved velocity solution', () => {
  it.each([
    [1, 1], [2, 1], [3, 1], [4, 2], [5, 2], [6, 2], [7, 1], [8, 2],
  ])('matches central differences of the base rates, roll rate and steered pivot angle (seed %i, %i base joints)', (seed, baseCount) => {
    const doc = steered(randomSheet(createRandom(seed), baseCount));
    const f = feedForward(doc).fingers[0];
    expect(Math.abs(f.steer.pivotChange)).toBeLessThan(1e-12);
    const size = expectMatchesFiniteDifferences(doc, 0);
    expect(size).toBeGreaterThan(1e-2);
    // The pivot really turns: a pivot held still would leave the roll direction off the remainder by psi_dot h (common practice).
    expect(Math.abs(f.acceleration!.steer.pivotRate)).toBeGreaterThan(1e-3);
  });

  it('leaves a difference that shrinks with the square of the step (second-order central difference, common practice)', () => {
    const doc = steered(randomSheet(createRandom(11), 2));
    const f = feedForward(doc).fingers[0], steer = f.acceleration!.steer;
    const error = (h: number) => {
      const m = steerRatesAStepLater(doc, f, 0, h);
      return norm([m.pivotRate - steer.pivotRate, m.rollAcceleration - steer.rollAcceleration, ...m.baseAccelerations.map((x, j) => x - steer.baseAccelerations[j])]);
    };
    expect(error(2e-3 / 5)).toBeLessThan(error(2e-3) / 10);
  });

  it('keeps the finger steered a step later: the pivot change left is of second order in the step', () => {
    // With the pivot moving at psi_dot the steering finds nothing to correct to first order; held still it would need psi_dot h.
    const doc = steered(randomSheet(createRandom(3), 1));
    const f = feedForward(doc).fingers[0], steer = f.acceleration!.steer;
    const m = steerRatesAStepLater(doc, f, 0, STEP);
    expect(Math.abs(m.plus.pivotChange)).toBeLessThan(1e-3 * Math.abs(steer.pivotRate) * STEP);
  });

  const sheetsDir = new URL('../../../content/sheets/', import.meta.url);
  let checkedDemoFingers = 0;
  const demoFiles = readdirSync(sheetsDir).filter((name) => name.endsWith('.json')).sort();

  it.each(demoFiles)('matches central differences on every steered finger of the demo sheet %s', (file) => {
    const parsed = parseSheet(JSON.parse(readFileSync(new URL(file, sheetsDir), 'utf8')));
    if (!parsed.ok) throw new Error(parsed.issues[0]?.message);
    // An invented acceleration on top of the sheet's own motion, so every term of the feed-forward is at work.
    const doc = steered({ ...parsed.doc, object: { ...parsed.doc.object, acceleration: { linear: [0.05, -0.02, 0.03], angular: [0.4, -0.3, 0.6] } } });
    const fingers = feedForward(doc).fingers;
    // Near rank loss of the drive columns the rates grow as 1 / sigma and a step of 1e-4 s is no longer small against their change.
    const defined = fingers.flatMap((f, i) => (f.acceleration!.steer.status === 'defined' && f.rankRatio > doc.solver.singularRatio ? [i] : []));
    for (const i of defined) expectMatchesFiniteDifferences(doc, i);
    checkedDemoFingers += defined.length;
  });

  it('has checked steered fingers on the demo sheets', () => {
    expect(checkedDemoFingers).toBeGreaterThanOrEqual(6);
  });
});

/** The three-finger test hand with each base axis tilted toward the contact normal, so the links before the pivot turn about it. */
function tiltedBaseSheet(): SheetDocument {
  const doc = threeFingerSheet();
  doc.object.twist = { linear: [0.01, 0.02, 0.01], angular: [0.3, 0.2, 0.5] };
  doc.object.acceleration = { linear: [0.1, 0.2, -0.1], angular: [1, -2, 0.5] };
  doc.hand.fingers = doc.hand.fingers.map((f) => {
    const base = f.joints[0].axis, pivot = f.joints[1].axis;
    return { ...f, joints: [{ ...f.joints[0], axis: unit(base.map((x, c) => x + 0.5 * pivot[c])) }, ...f.joints.slice(1)] };
  });
  return doc;
}

describe('the pivot rate of the usual build, a pivot along the normal through the ball roller\'s centre', () => {
  it('is the rate of turn of the remainder about the normal less the turn of the links before the pivot', () => {
    // The direction angle of a vector u in the plane normal to n turns at (u x u_dot) . n / |u|^2 (plane kinematics, common
    // practice); the roll direction, square to the pivot, turns about n with the pivot and with the links before it, whose
    // angular velocity is sum_k q_dot_k w_k (Murray, Li & Sastry 1994, ch. 3). u_dot is measured here by central differences.
    const doc = steered(tiltedBaseSheet());
    const fingers = feedForward(doc).fingers;
    for (const [i, f] of fingers.entries()) {
      const steer = f.acceleration!.steer, n = f.contact.normal, u = f.steer.remainder;
      expect(steer.status).toBe('defined');
      const { remainderRate } = steerRatesAStepLater(doc, f, i, 1e-5);
      const turn = cross(u, remainderRate).reduce((sum, x, c) => sum + x * n[c], 0) / (u[0] ** 2 + u[1] ** 2 + u[2] ** 2);
      const beforePivot = [0, 1, 2].map((c) => f.steer.rates[0] * f.jointAxes[c]);
      const frameTurn = beforePivot.reduce((sum, x, c) => sum + x * n[c], 0);
      const pivotAlongNormal = [3, 4, 5].reduce((sum, k, c) => sum + f.jointAxes[k] * n[c], 0);
      expect(Math.abs(frameTurn)).toBeGreaterThan(0.05);
      expect(steer.pivotRate).toBeNear((turn - frameTurn) / pivotAlongNormal, { abs: 1e-6 * Math.abs(steer.pivotRate) });
    }
  });

  it('is the same before the pivot has turned: a ball centred on the pivot axis keeps its contact at every pivot angle', () => {
    // Turning a ball about an axis through its centre maps its surface onto itself (common practice), so the feed-forward
    // given at the steered posture from the unsteered solve must equal the one solved with the pivot already turned.
    const doc = tiltedBaseSheet();
    const unsteered = feedForward(doc).fingers, turned = feedForward(steered(doc)).fingers;
    for (const [i, f] of unsteered.entries()) {
      expect(Math.abs(f.steer.pivotChange)).toBeGreaterThan(0.1);
      const a = f.acceleration!.steer, b = turned[i].acceleration!.steer;
      expect(a.status).toBe('defined');
      expect([a.pivotRate, a.rollAcceleration, ...a.baseAccelerations]).toBeNear([b.pivotRate, b.rollAcceleration, ...b.baseAccelerations], { abs: 1e-9, rel: 1e-9 });
    }
  });

  it('holds the remainder rate that the base and roll accelerations are built on (central differences, common practice)', () => {
    const doc = steered(tiltedBaseSheet());
    for (const [i, f] of feedForward(doc).fingers.entries()) {
      const rate = f.acceleration!.steer.remainderRate;
      expect(steerRatesAStepLater(doc, f, i, 1e-5).remainderRate).toBeNear(Array.from(rate), { abs: 1e-6 * norm(rate) });
    }
  });
});

describe('steer-and-roll feed-forward where it is not defined', () => {
  it('says "at-rest" when the object point at the contact does not move, with no number', () => {
    const doc = threeFingerSheet();
    doc.object.twist = { linear: [0, 0, 0], angular: [0, 0, 0] };
    const steer = feedForward(doc).fingers[0].acceleration!.steer;
    expect(steer.status).toBe('at-rest');
    expect(steer.pivotRate).toBeNaN();
  });

  it('says "not-steered" for a cylindrical roller whose pivot has yet to turn, and is defined once it has', () => {
    const parsed = parseSheet(JSON.parse(readFileSync(new URL('../../../content/sheets/line4-gauge-ball-off-centre.json', import.meta.url), 'utf8')));
    if (!parsed.ok) throw new Error(parsed.issues[0]?.message);
    const unsteered = feedForward(parsed.doc).fingers.find((f) => Math.abs(f.steer.pivotChange) > 1e-6 && f.steer.aligned);
    expect(unsteered?.acceleration!.steer.status).toBe('not-steered');
  });

  it('says "out-of-range" rather than reporting an overflowed number, so the rest of the sheet still evaluates', () => {
    const doc = threeFingerSheet();
    const solved = solveSheet(doc);
    const curvature = sheetCurvature(doc, solved)[0];
    const steer = solveSteerAcceleration(solved.fingers[0], doc.hand.fingers[0], solved.object.angularVelocity, [1e308, -1e308, 1e308], curvature, doc.solver);
    expect(steer.status).toBe('out-of-range');
    const finite = solveSteerAcceleration(solved.fingers[0], doc.hand.fingers[0], solved.object.angularVelocity, [1, -1, 1], curvature, doc.solver);
    expect(finite.status).toBe('defined');
  });

  it('says "not-available" for a finger without a pivot', () => {
    const doc = threeFingerSheet();
    doc.hand.fingers = doc.hand.fingers.map((f) => ({ ...f, joints: f.joints.filter((j) => j.role !== 'pivot') }));
    expect(feedForward(doc).fingers[0].acceleration!.steer.status).toBe('not-available');
  });
});
