import { glMatrix, quat as glQuat } from 'gl-matrix';
import { describe, expect, it } from 'vitest';
import { twistBetween } from '../../../src/lib/logs/differentiate';

glMatrix.setMatrixArrayType(Array);

// A motion with a known angular velocity: q(t) = qa(t) qb(t), each turning about a fixed axis at a constant rate.
// Each factor's derivative by calculus, d/dt [sin(at/2) u, cos(at/2)] = (a/2) [cos(at/2) u, -sin(at/2)]; the product
// rule for the Hamilton product (gl-matrix quat.multiply, [x, y, z, w]); then the world-frame angular velocity
// w = 2 q_dot q* (Diebel 2006, "Representing Attitude", Sec. 6, with the vector part read as w).
const axisA = [0, 0, 1], axisB = [0.6, 0.8, 0];
const rateA = 1.3, rateB = -0.7;
const about = (axis: number[], angle: number) => glQuat.setAxisAngle(glQuat.create(), axis as [number, number, number], angle);
const derivative = (axis: number[], rate: number, t: number) => {
  const c = Math.cos((rate * t) / 2), s = Math.sin((rate * t) / 2);
  return glQuat.fromValues((rate / 2) * c * axis[0]!, (rate / 2) * c * axis[1]!, (rate / 2) * c * axis[2]!, -(rate / 2) * s);
};
const orientation = (t: number) => glQuat.multiply(glQuat.create(), about(axisA, rateA * t), about(axisB, rateB * t));
function angularVelocity(t: number): number[] {
  const qa = about(axisA, rateA * t), qb = about(axisB, rateB * t);
  const dq = glQuat.add(glQuat.create(), glQuat.multiply(glQuat.create(), derivative(axisA, rateA, t), qb), glQuat.multiply(glQuat.create(), qa, derivative(axisB, rateB, t)));
  const w = glQuat.multiply(glQuat.create(), dq, glQuat.conjugate(glQuat.create(), orientation(t)));
  expect(Math.abs(w[3]!)).toBeLessThan(1e-12); // 2 q_dot q* of a unit quaternion is a pure quaternion.
  return [2 * w[0]!, 2 * w[1]!, 2 * w[2]!];
}
const position = (t: number) => [Math.sin(t), t * t, Math.exp(-t)];
const velocity = (t: number) => [Math.cos(t), 2 * t, -Math.exp(-t)];

function centralError(t: number, h: number): number {
  const out = twistBetween(position(t - h), orientation(t - h), t - h, position(t + h), orientation(t + h), t + h, new Float64Array(6));
  const expected = [...velocity(t), ...angularVelocity(t)];
  return Math.max(...expected.map((v, i) => Math.abs(v - out[i]!)));
}

function forwardError(t: number, h: number): number {
  const out = twistBetween(position(t), orientation(t), t, position(t + h), orientation(t + h), t + h, new Float64Array(6));
  const expected = [...velocity(t), ...angularVelocity(t)];
  return Math.max(...expected.map((v, i) => Math.abs(v - out[i]!)));
}

describe('object twist from logged poses', () => {
  it('matches w = 2 q_dot q* and dp/dt within the central difference error at a 1 ms step', () => {
    expect(centralError(0.8, 1e-3)).toBeLessThan(1e-5);
  });

  it('the central difference is second order: halving the step quarters the error (Burden & Faires, Numerical Analysis, Sec. 4.1)', () => {
    const ratio = centralError(0.8, 2e-3) / centralError(0.8, 1e-3);
    expect(ratio).toBeGreaterThan(3.8);
    expect(ratio).toBeLessThan(4.2);
  });

  it('the one-sided difference at the ends is first order: halving the step halves the error (same source)', () => {
    const ratio = forwardError(0.8, 2e-3) / forwardError(0.8, 1e-3);
    expect(ratio).toBeGreaterThan(1.9);
    expect(ratio).toBeLessThan(2.1);
  });

  it('reads q and -q as the same attitude: a sign flip between samples changes nothing', () => {
    const h = 1e-3, t = 0.4;
    const flipped = glQuat.scale(glQuat.create(), orientation(t + h), -1);
    const a = twistBetween(position(t - h), orientation(t - h), t - h, position(t + h), orientation(t + h), t + h, new Float64Array(6));
    const b = twistBetween(position(t - h), orientation(t - h), t - h, position(t + h), flipped, t + h, new Float64Array(6));
    expect(Array.from(b)).toBeNear(Array.from(a), { abs: 1e-12 });
  });
});
