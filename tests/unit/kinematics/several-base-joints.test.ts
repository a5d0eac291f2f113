import { describe, expect, it } from 'vitest';
import { Matrix as MlMatrix, pseudoInverse } from 'ml-matrix';
import type { FingerInput } from '../../../src/lib/sheet/types';
import { ball, solveFinger } from './single-finger';
import { threeFingerFinger } from './three-finger-sheet';

/**
 * Finger 0 of the test hand (normal n = x, contact y = (0.04, 0, 0), first base column (0.05, 0, 0.06)) with a
 * second base joint about z through (0.04, -0.03, 0): its column z x (y - r) = z x (0, 0.03, 0) = (-0.03, 0, 0),
 * so its normal gain is -0.03 m/rad (worked by hand).
 */
function twoBaseFinger(): FingerInput {
  const input = threeFingerFinger(0);
  input.joints.splice(1, 0, { name: 'base 2', role: 'base', axis: [0, 0, 1], point: [0.04, -0.03, 0], angle: 0 });
  return input;
}

const v: [number, number, number] = [0.01, 0.02, 0.02];

describe('steer-and-roll with several base joints shares the normal velocity by the minimum-norm rule', () => {
  it('base rates a (n . v) / |a|^2 with a = (0.05, -0.03) m/rad and n . v = 0.01 m/s (pseudo-inverse of a 1 x k row, worked by hand)', () => {
    const { steer } = solveFinger(twoBaseFinger(), ball(0.04, v));
    expect(steer.available).toBe(true);
    expect(steer.baseJoints).toEqual([0, 1]);
    expect(steer.normalGains).toBeNear([0.05, -0.03], { digits: 14 });
    // Moore-Penrose pseudo-inverse of a row a: a^+ = a^T / |a|^2 (common practice; Strang, Introduction to Linear Algebra, ch. 7).
    const squared = 0.05 ** 2 + 0.03 ** 2;
    expect(steer.baseRates).toBeNear([(0.05 * 0.01) / squared, (-0.03 * 0.01) / squared], { digits: 13 });
    expect(steer.normalGain).toBeCloseTo(Math.sqrt(squared), 15);
    // The base joints' entries of the joint rates are the base rates.
    expect([steer.rates[0], steer.rates[1]]).toBeNear(Array.from(steer.baseRates), { digits: 15 });
  });

  it('agrees with the pseudo-inverse of ml-matrix (a general-purpose reference library) and meets the normal velocity', () => {
    const { finger, contact, steer } = solveFinger(twoBaseFinger(), ball(0.04, v));
    const n = contact.normal;
    // The base columns from the joint axes and points, independently of the solver: w x (y - r).
    const row = [0, 1].map((k) => {
      const w = finger.axes.subarray(3 * k, 3 * k + 3), r = finger.points.subarray(3 * k, 3 * k + 3), y = contact.rollerPoint;
      const e = [y[0] - r[0], y[1] - r[1], y[2] - r[2]];
      const column = [w[1] * e[2] - w[2] * e[1], w[2] * e[0] - w[0] * e[2], w[0] * e[1] - w[1] * e[0]];
      return n[0] * column[0] + n[1] * column[1] + n[2] * column[2];
    });
    const normalSpeed = n[0] * v[0] + n[1] * v[1] + n[2] * v[2];
    const reference = pseudoInverse(new MlMatrix([row])).mmul(new MlMatrix([[normalSpeed]])).to1DArray();
    expect(steer.baseRates).toBeNear(reference, { digits: 12 });
    // The steered rates produce the normal velocity: n . (J_after rates) = n . v_o.
    const achievedNormal = n[0] * steer.achieved[0] + n[1] * steer.achieved[1] + n[2] * steer.achieved[2];
    expect(achievedNormal).toBeCloseTo(normalSpeed, 14);
    // Rolling without slip is still reached: the roll joint covers the tangential rest after steering.
    expect(steer.residualNorm).toBeLessThan(1e-14);
  });

  it('no other pair of base rates meeting the normal velocity is shorter (second route: scan along the null space of the row)', () => {
    const { steer } = solveFinger(twoBaseFinger(), ball(0.04, v));
    const length = Math.hypot(steer.baseRates[0], steer.baseRates[1]);
    // (0.03, 0.05) is orthogonal to a = (0.05, -0.03): adding it keeps a . rates = n . v.
    for (let t = -1; t <= 1; t += 0.01) {
      if (Math.abs(t) < 1e-12) continue;
      const other = [steer.baseRates[0] + 0.03 * t, steer.baseRates[1] + 0.05 * t];
      expect(0.05 * other[0] - 0.03 * other[1]).toBeCloseTo(0.01, 14);
      expect(Math.hypot(other[0], other[1])).toBeGreaterThan(length);
    }
  });

  it('a finger with one base joint keeps the plain quotient n . v / a', () => {
    const { steer } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    expect(steer.baseJoints).toEqual([0]);
    expect(steer.baseRates).toBeNear([0.01 / 0.05], { digits: 14 });
  });

  it('base joints whose columns have no normal part get rate 0 and leave the whole velocity to the roller', () => {
    const input = twoBaseFinger();
    // Both base axes along the normal x through the contact line: their columns x x (y - r) have no x part.
    input.joints[0] = { ...input.joints[0], axis: [1, 0, 0], point: [0.1, 0, -0.05] };
    input.joints[1] = { ...input.joints[1], axis: [1, 0, 0], point: [0.1, 0.02, 0] };
    const { steer } = solveFinger(input, ball(0.04, v));
    expect(steer.normalGain).toBe(0);
    expect(Array.from(steer.baseRates)).toEqual([0, 0]);
    expect(steer.remainder).toBeNear(v, { digits: 15 });
  });
});
