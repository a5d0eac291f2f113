import { quat as glQuat, vec3 as glVec3 } from 'gl-matrix';
import { integrateOrientation } from './acceleration-trajectory';
import { describe, expect, it } from 'vitest';
import { createFinger, forwardKinematics } from '../../../src/lib/kinematics/hand';
import { contactJacobian } from '../../../src/lib/kinematics/full-solution';
import {
  createLinalgWorkspace, createScene, dampedLeastSquares, jacobianRateTimesRates, matrixFromRows, objectPointAcceleration,
  setJointAngles, setObjectPose, setObjectTwist, sheetCurvature, solveAccelerations, solveScene, solveSheet, type Scene,
} from '../../../src/lib/kinematics/index';
import type { FingerInput, ObjectAcceleration, SheetDocument } from '../../../src/lib/sheet/types';
import { threeFingerSheet } from './three-finger-sheet';

type V3 = [number, number, number];

/** World position at time t of the body point at local offset rLocal, origin moved by p0 + v t + a t^2 / 2. */
function bodyPoint(p0: V3, v: V3, a: V3, q0: number[], omega: V3, alpha: V3, rLocal: V3, t: number): number[] {
  const q = integrateOrientation(q0, omega, alpha, t);
  const r = [0, 0, 0];
  glVec3.transformQuat(r as unknown as glVec3, rLocal, q as unknown as glQuat);
  return [0, 1, 2].map((c) => p0[c] + v[c] * t + (a[c] * t * t) / 2 + r[c]);
}

/** Second central difference (f(h) - 2 f(0) + f(-h)) / h^2 of a vector function (common practice). */
function secondDifference(f: (t: number) => number[], h: number): number[] {
  const [plus, mid, minus] = [f(h), f(0), f(-h)];
  return plus.map((x, c) => (x - 2 * mid[c] + minus[c]) / (h * h));
}

const cross = (a: ArrayLike<number>, b: ArrayLike<number>): V3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const norm = (v: ArrayLike<number>) => Math.hypot(...Array.from(v));

/**
 * A made-up finger reaching a 40 mm ball from +x (numbers invented for tests): a base about y below
 * the ball, a swing about z beside it, and a roll about a tilted axis through the roller centre,
 * so that its 3 x 3 contact Jacobian has full rank.
 */
const reachingFinger: FingerInput = {
  name: 'reaching',
  joints: [
    { name: 'base', role: 'base', axis: [0, 1, 0], point: [0.1, 0, -0.05], angle: 0 },
    { name: 'swing', role: 'other', axis: [0, 0, 1], point: [0.07, 0.01, 0], angle: 0 },
    { name: 'roll', role: 'roll', axis: [0.3 / Math.hypot(0.3, 0.2, 1), 0.2 / Math.hypot(0.3, 0.2, 1), 1 / Math.hypot(0.3, 0.2, 1)], point: [0.052, 0, 0], angle: 0 },
  ],
  roller: { kind: 'sphere', radius: 0.012, center: [0.052, 0, 0] },
};

const objectAcceleration: ObjectAcceleration = { linear: [0.2, -0.1, 0.3], angular: [1, 0.5, -2] };

function reachingSheet(): SheetDocument {
  const base = threeFingerSheet();
  return {
    ...base,
    object: { ...base.object, twist: { linear: [0.01, 0.005, 0.02], angular: [0.3, -0.2, 0.5] }, acceleration: objectAcceleration },
    hand: { name: 'one finger', fingers: [reachingFinger] },
    solver: { ...base.solver, damping: 0 },
  };
}

describe('object point acceleration a_o + alpha x r + omega x (omega x r)', () => {
  it('equals the second central difference of a body point moved by an integrated pose', () => {
    // Rigid-body acceleration (Craig, Introduction to Robotics, ch. 6; Meriam, Dynamics, ch. 5) checked
    // against the second derivative of the point's path (common practice), orientation integrated by RK4.
    const p0: V3 = [0.01, -0.02, 0.03], v: V3 = [0.1, 0.05, -0.2], a: V3 = [1.5, -0.7, 2];
    const omega: V3 = [2, -1, 3], alpha: V3 = [-4, 6, 1.5];
    const q0 = [0.1, -0.2, 0.3, Math.sqrt(1 - 0.14)];
    const rLocal: V3 = [0.03, 0.01, -0.02];
    const h = 1e-3;
    const measured = secondDifference((t) => bodyPoint(p0, v, a, q0, omega, alpha, rLocal, t), h);
    const x = bodyPoint(p0, v, a, q0, omega, alpha, rLocal, 0);
    const centripetal = new Float64Array(3);
    const computed = objectPointAcceleration(a, alpha, omega, p0, x, new Float64Array(3), centripetal);
    expect(computed).toBeNear(measured, { abs: 1e-6, rel: 1e-6 });
    // The centripetal part alone: |omega x (omega x r)| = |omega|^2 |r_perp|, pointing at the axis (from memory, any dynamics text).
    const r = [x[0] - p0[0], x[1] - p0[1], x[2] - p0[2]];
    const w2 = omega[0] ** 2 + omega[1] ** 2 + omega[2] ** 2;
    const along = (omega[0] * r[0] + omega[1] * r[1] + omega[2] * r[2]) / w2;
    expect(centripetal).toBeNear(r.map((rc, c) => -w2 * (rc - along * omega[c])), { abs: 1e-15, rel: 1e-12 });
  });
});

describe('J_dot q_dot of a finger', () => {
  const finger = createFinger(reachingFinger);
  const angles = [0.2, -0.3, 0.4], rates = [0.7, -1.2, 2.5];

  /** The finger's joint axes, points and last-link transform at angles + rates t. */
  function at(t: number) {
    for (let k = 0; k < 3; k++) finger.angles[k] = angles[k] + rates[k] * t;
    forwardKinematics(finger);
    return { axes: Float64Array.from(finger.axes), points: Float64Array.from(finger.points), rotation: Float64Array.from(finger.rollerRotation), translation: Float64Array.from(finger.chainTranslation) };
  }
  const now = at(0);
  const y0 = [0.045, 0.004, -0.006];
  // y0 as a point of the last link at home: R^T (y0 - t).
  const d = [y0[0] - now.translation[0], y0[1] - now.translation[1], y0[2] - now.translation[2]];
  const R = now.rotation;
  const yHome = [0, 1, 2].map((c) => R[c] * d[0] + R[3 + c] * d[1] + R[6 + c] * d[2]);
  const materialPoint = (t: number) => {
    const s = at(t);
    return [0, 1, 2].map((c) => s.rotation[3 * c] * yHome[0] + s.rotation[3 * c + 1] * yHome[1] + s.rotation[3 * c + 2] * yHome[2] + s.translation[c]);
  };

  it('equals the central difference of J(q + q_dot t) q_dot at t = +-h', () => {
    // Siciliano et al. 2009, Robotics: Modelling, Planning and Control, sec. 3.1: d/dt (J q_dot) = J q_ddot + J_dot q_dot,
    // so with q_ddot = 0 the time derivative of J q_dot along q + q_dot t is J_dot q_dot (central difference, common practice).
    const jq = (t: number) => {
      const s = at(t);
      const y = materialPoint(t);
      const j = contactJacobian(s.axes, s.points, 3, y, matrixFromRows([[0, 0, 0], [0, 0, 0], [0, 0, 0]]));
      return [0, 1, 2].map((row) => j.data[3 * row] * rates[0] + j.data[3 * row + 1] * rates[1] + j.data[3 * row + 2] * rates[2]);
    };
    const h = 1e-5;
    const [plus, minus] = [jq(h), jq(-h)];
    const measured = plus.map((x, c) => (x - minus[c]) / (2 * h));
    at(0);
    const computed = jacobianRateTimesRates(now.axes, now.points, 3, y0, rates);
    expect(computed).toBeNear(measured, { abs: 1e-8, rel: 1e-6 });
    expect(norm(computed)).toBeGreaterThan(0.01);
  });

  it('equals the second difference of the roller material point moved by q + q_dot t', () => {
    // An independent route with no Jacobian at all: the point's path under constant joint rates (common practice).
    const measured = secondDifference(materialPoint, 1e-4);
    expect(jacobianRateTimesRates(now.axes, now.points, 3, y0, rates)).toBeNear(measured, { abs: 1e-6, rel: 1e-5 });
  });

  it('gives the last link angular acceleration sum_k q_dot_k w_k_dot of the chain', () => {
    // Angular velocity of the last link is sum_k q_dot_k w_k (Murray, Li & Sastry 1994, ch. 3); its central difference along q + q_dot t.
    const omegaLink = (t: number) => {
      const s = at(t);
      return [0, 1, 2].map((c) => rates[0] * s.axes[c] + rates[1] * s.axes[3 + c] + rates[2] * s.axes[6 + c]);
    };
    const h = 1e-5;
    const measured = omegaLink(h).map((x, c) => (x - omegaLink(-h)[c]) / (2 * h));
    const angular = new Float64Array(3);
    jacobianRateTimesRates(now.axes, now.points, 3, y0, rates, new Float64Array(3), angular);
    expect(angular).toBeNear(measured, { abs: 1e-8, rel: 1e-6 });
  });
});

describe('joint accelerations of the full solution', () => {
  const doc = reachingSheet();
  const result = feedForward(doc);
  const f = result.fingers[0];
  const acc = f.acceleration!;

  it('satisfy J q_ddot + J_dot q_dot = a_x + rolling term for a full-rank finger without damping', () => {
    // The differentiated velocity constraint (Siciliano et al. 2009, sec. 3.1), checked by multiplying out.
    expect(f.full.conditionNumber).toBeLessThan(1e3);
    const j = f.full.jacobian.data;
    const product = [0, 1, 2].map((row) => j[3 * row] * acc.jointAccelerations[0] + j[3 * row + 1] * acc.jointAccelerations[1] + j[3 * row + 2] * acc.jointAccelerations[2]);
    expect(product.map((x, c) => x + acc.jacobianRate[c])).toBeNear(Array.from(acc.objectPoint).map((x, c) => x + acc.rollingTerm[c]), { abs: 1e-12, rel: 1e-9 });
    expect(acc.residualNorm).toBeLessThan(1e-10);
    expect(norm(acc.jointAccelerations)).toBeGreaterThan(1);
  });

  it('reads a missing object acceleration as zero, leaving the centripetal and J_dot q_dot terms', () => {
    const solved = solveSheet(doc);
    const still = solveAccelerations(solved, undefined, doc.solver, sheetCurvature(doc, solved), doc.hand.fingers).fingers[0].acceleration!;
    const c = f.contact.objectPoint, w = result.object.angularVelocity;
    const r = [c[0], c[1], c[2]];
    expect(still.objectPoint).toBeNear(cross(w, cross(w, r)), { abs: 1e-15, rel: 1e-12 });
    expect(still.jacobianRate).toBeNear(Array.from(acc.jacobianRate), { abs: 1e-15, rel: 1e-12 });
    // The rolling term depends on velocities only, not on the object's acceleration.
    expect(still.rollingTerm).toBeNear(Array.from(acc.rollingTerm), { abs: 1e-15, rel: 1e-12 });
  });

  it('is not computed by solveScene, so runs and sweeps stay as fast as before', () => {
    expect(solveSheet(doc).fingers[0].acceleration).toBeUndefined();
  });
});

/** The reaching sheet with a pivot about the normal through the roller centre and the soft-finger row: a square, regular 4 x 4 system. */
function softFingerSheet(): SheetDocument {
  const doc = reachingSheet();
  const pivot = { name: 'pivot', role: 'pivot' as const, axis: [1, 0, 0] as V3, point: [0.052, 0, 0] as V3, angle: 0 };
  doc.hand.fingers = [{ ...reachingFinger, joints: [...reachingFinger.joints.slice(0, 2), pivot, reachingFinger.joints[2]] }];
  doc.solver = { ...doc.solver, softFinger: true };
  return doc;
}

describe('joint accelerations with the soft-finger row', () => {
  it('keep the spin about the normal: n . (sum_k w_k q_ddot_k + sum_k q_dot_k w_k_dot) = n . alpha + n_dot . (omega_o - omega_f), with the point rows', () => {
    // The time derivative of the soft-finger row n . omega_f = n . omega_o; the last link's angular acceleration is checked
    // against finite differences above, n_dot = omega_o x n + L_o u_o for a 40 mm ball (L_o = I / R, do Carmo 1976, sec. 3-2).
    const doc = softFingerSheet();
    const f = feedForward(doc).fingers[0];
    const acc = f.acceleration!;
    expect(acc.rows).toBe(4);
    const n = f.contact.normal, qdd = acc.jointAccelerations, omega = doc.object.twist.angular;
    const linkAcceleration = [0, 1, 2].map((c) => acc.linkAngularRate[c] + [0, 1, 2, 3].reduce((sum, k) => sum + f.jointAxes[3 * k + c] * qdd[k], 0));
    const omegaFinger = [0, 1, 2].map((c) => [0, 1, 2, 3].reduce((sum, k) => sum + f.full.rates[k] * f.jointAxes[3 * k + c], 0));
    const overObject = sheetCurvature(doc, solveSheet(doc))[0].wander.objectVelocity!;
    const normalRate = cross(omega, n).map((x, c) => x + overObject[c] / 0.04);
    const turn = normalRate.reduce((sum, x, c) => sum + x * (omega[c] - omegaFinger[c]), 0);
    const alpha = objectAcceleration.angular;
    expect(Math.abs(turn)).toBeGreaterThan(1e-3);
    expect(n[0] * linkAcceleration[0] + n[1] * linkAcceleration[1] + n[2] * linkAcceleration[2]).toBeNear(n[0] * alpha[0] + n[1] * alpha[1] + n[2] * alpha[2] + turn, { abs: 1e-9 });
    expect(acc.residualNorm).toBeLessThan(1e-10);
  });

  it('changes the joint rates of the soft-finger solve by exactly q_ddot h a small step later', () => {
    // Same independent route as the end-to-end tests below: central difference of the re-solved rates (common practice).
    const doc = softFingerSheet();
    const acc = feedForward(doc).fingers[0].acceleration!;
    expect(acc.model).toBe('rolling-contact');
    const { derivative } = ratesAStepLater(doc, acc.jointAccelerations, 1e-4);
    expect(derivative).toBeNear(Array.from(acc.jointAccelerations), { abs: 1e-6 * norm(acc.jointAccelerations) });
  });
});

/** The one-finger reaching sheet with a cylindrical roller of radius 12 mm, its axis along the roll joint and square to the contact normal, touching the ball on its side. */
function cylinderReachingSheet(): SheetDocument {
  const doc = reachingSheet();
  const axis: V3 = [0, 0.2 / Math.hypot(0.2, 1), 1 / Math.hypot(0.2, 1)];
  const roll = { ...reachingFinger.joints[2], axis };
  doc.hand.fingers = [{ ...reachingFinger, joints: [...reachingFinger.joints.slice(0, 2), roll], roller: { kind: 'cylinder', radius: 0.012, halfWidth: 0.006, center: [0.052, 0, 0], axis } }];
  return doc;
}

/** Solves a sheet's velocities and feed-forward as an evaluation does: curvature first, then the accelerations. */
function feedForward(doc: SheetDocument) {
  const solved = solveSheet(doc);
  return solveAccelerations(solved, doc.object.acceleration, doc.solver, sheetCurvature(doc, solved), doc.hand.fingers);
}

/**
 * Moves the object with its twist and acceleration and the joints with q_dot t + q_ddot t^2 / 2, and
 * solves the velocities again at t = +-h: the central difference of the joint rates is d/dt q_dot at 0,
 * which the feed-forward's q_ddot must equal (an independent route: no acceleration formula is used).
 */
function ratesAStepLater(doc: SheetDocument, jointAccelerations: ArrayLike<number>, h: number) {
  const f = feedForward(doc).fingers[0];
  const q0 = Array.from(f.jointAngles), qd = Array.from(f.full.rates), qdd = Array.from(jointAccelerations);
  const p0 = doc.object.pose.position, v = doc.object.twist.linear, omega = doc.object.twist.angular;
  const a = objectAcceleration.linear, alpha = objectAcceleration.angular;
  const scene: Scene = createScene(doc);
  const later = (t: number) => {
    setObjectPose(scene, p0.map((p, c) => p + v[c] * t + (a[c] * t * t) / 2), integrateOrientation([0, 0, 0, 1], omega as V3, alpha as V3, t));
    setObjectTwist(scene, v.map((x, c) => x + a[c] * t), omega.map((x, c) => x + alpha[c] * t));
    setJointAngles(scene, 0, q0.map((q, k) => q + qd[k] * t + (qdd[k] * t * t) / 2));
    const r = solveScene(scene).fingers[0];
    return { rates: Array.from(r.full.rates), gap: r.contact.gap, state: r.contact.state };
  };
  const [plus, minus] = [later(h), later(-h)];
  return { plus, minus, derivative: plus.rates.map((x, k) => (x - minus.rates[k]) / (2 * h)) };
}

describe('end to end: the velocity solution a small time step later', () => {
  // Central differences with h = 1e-4 s: truncation error about h^2 |q_dddot| / 6, here below 1e-6 of |q_ddot| (common practice).
  const h = 1e-4;

  it.each([
    ['a ball roller', reachingSheet],
    ['a cylindrical roller on its side', cylinderReachingSheet],
  ])('changes the joint rates by exactly q_ddot h for %s in sustained rolling', (_, make) => {
    const doc = make();
    const f = feedForward(doc).fingers[0], acc = f.acceleration!;
    expect(acc.model).toBe('rolling-contact');
    expect(f.full.conditionNumber).toBeLessThan(1e3);
    const { plus, derivative } = ratesAStepLater(doc, acc.jointAccelerations, h);
    expect(plus.state).toBe('touching');
    expect(Math.abs(plus.gap)).toBeLessThan(1e-7);
    // Without the rolling term the two would differ by J^-1 times it; that part is far above the tolerance here.
    const withoutRolling = dampedLeastSquares(f.full.jacobian, acc.rollingTerm, 0, new Float64Array(3), createLinalgWorkspace(4, 4));
    expect(norm(withoutRolling) / norm(acc.jointAccelerations)).toBeGreaterThan(1e-2);
    expect(derivative).toBeNear(Array.from(acc.jointAccelerations), { abs: 1e-6 * norm(acc.jointAccelerations) });
    // What is left is the difference's own truncation: a fifth of the step leaves about a 25th of it (second order, common practice).
    const left = (step: number) => norm(ratesAStepLater(doc, acc.jointAccelerations, step).derivative.map((x, k) => x - acc.jointAccelerations[k]));
    expect(left(h / 5)).toBeLessThan(left(h) / 10);
  });

  it('has the size the reference states for a ball on a ball: along the normal, omega_t^2 R rho / (R + rho)', () => {
    // Two balls rolling without slip, relative angular velocity w = omega_o - omega_f: the contact moves at
    // u = (n x w) R rho / (R + rho) over both (Montana 1988, contact equations, from memory), so the term
    // w x u = (w x (n x w)) R rho / (R + rho) has the normal part |w_t|^2 R rho / (R + rho) and the tangential
    // part -(w . n) w_t R rho / (R + rho) (vector triple product, common practice).
    const doc = reachingSheet();
    const f = feedForward(doc).fingers[0], acc = f.acceleration!;
    const omega = doc.object.twist.angular;
    const omegaFinger = [0, 1, 2].map((c) => f.full.rates.reduce((sum, rate, k) => sum + rate * f.jointAxes[3 * k + c], 0));
    const n = Array.from(f.contact.normal), w = omega.map((x, c) => x - omegaFinger[c]);
    const spin = w.reduce((sum, x, c) => sum + x * n[c], 0);
    const tangential = w.map((x, c) => x - spin * n[c]);
    const R = 0.04, rho = 0.012, scale = (R * rho) / (R + rho);
    const expected = n.map((nc, c) => norm(tangential) ** 2 * scale * nc - spin * tangential[c] * scale);
    expect(acc.rollingTerm).toBeNear(expected, { abs: 1e-12, rel: 1e-6 });
  });
});

/** A cylindrical roller of radius 12 mm lying flat on the top face of a box, its axis along y: a line contact. */
function lineContactSheet(): SheetDocument {
  const doc = reachingSheet();
  const center: V3 = [0.01, 0, 0.03 + 0.012];
  doc.object = { ...doc.object, shape: { kind: 'box', halfExtents: [0.05, 0.04, 0.03], filletRadius: 0.002 } };
  doc.hand.fingers = [{
    name: 'flat',
    joints: [
      { name: 'base', role: 'base', axis: [1, 0, 0], point: [0.01, -0.03, 0.1], angle: 0 },
      { name: 'swing', role: 'other', axis: [0, 0, 1], point: [0.04, 0.02, 0.05], angle: 0 },
      { name: 'roll', role: 'roll', axis: [0, 1, 0], point: center, angle: 0 },
    ],
    roller: { kind: 'cylinder', radius: 0.012, halfWidth: 0.006, center, axis: [0, 1, 0] },
  }];
  return doc;
}

describe('where the contact point\'s motion is not defined', () => {
  it('matches the material points and says so for a line contact (a cylindrical roller flat on a face)', () => {
    const doc = lineContactSheet();
    const solved = solveSheet(doc);
    const curvatures = sheetCurvature(doc, solved);
    expect(curvatures[0].wander.status).toBe('singular');
    const acc = solveAccelerations(solved, doc.object.acceleration, doc.solver, curvatures, doc.hand.fingers).fingers[0].acceleration!;
    expect(acc.model).toBe('material-points');
    expect(Array.from(acc.rollingTerm)).toEqual([0, 0, 0]);
    // The material-point model is the differentiated constraint without the rolling term (Siciliano et al. 2009, sec. 3.1).
    expect(Array.from(acc.target.subarray(0, 3))).toBeNear(Array.from(acc.objectPoint).map((x, c) => x - acc.jacobianRate[c]), { abs: 1e-15 });
  });

  it('takes a finger\'s known acceleration as it is', () => {
    const doc = lineContactSheet();
    const solved = solveSheet(doc);
    const curvatures = sheetCurvature(doc, solved, [undefined]);
    const known = solveAccelerations(solveSheet(doc), doc.object.acceleration, doc.solver, curvatures, doc.hand.fingers).fingers[0].acceleration!;
    expect(solveAccelerations(solved, doc.object.acceleration, doc.solver, curvatures, doc.hand.fingers, [known]).fingers[0].acceleration).toBe(known);
  });

  it('matches the material points when no curvature is given for the finger', () => {
    const doc = reachingSheet();
    const acc = solveAccelerations(solveSheet(doc), doc.object.acceleration, doc.solver, [], doc.hand.fingers).fingers[0].acceleration!;
    expect(acc.model).toBe('material-points');
    expect(acc.spinRollingTerm).toBe(0);
  });
});
