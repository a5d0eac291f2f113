import { describe, expect, it } from 'vitest';
import { eigs, matrix, multiply, transpose, type Matrix as MathMatrix } from 'mathjs';
import { conditionNumber, numericalRank } from '../../../src/lib/kinematics/linalg';
import type { FingerInput } from '../../../src/lib/sheet/types';
import { ball, solveFinger } from './single-finger';

type Vec = [number, number, number];

function unit(v: Vec): Vec {
  const length = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / length, v[1] / length, v[2] / length];
}

/** Singular values of the 3 x n Jacobian as square roots of the eigenvalues of J^T J by mathjs, descending (the independent route). */
function mathjsSingularValues(data: Float64Array, n: number): number[] {
  const j = matrix([0, 1, 2].map((i) => Array.from(data.subarray(i * n, i * n + n))));
  const gram = multiply(transpose(j), j) as MathMatrix;
  const values = (eigs(gram).values as MathMatrix).toArray() as number[];
  return values.map((v) => Math.sqrt(Math.max(0, v))).sort((a, b) => b - a).slice(0, 3);
}

/** Three joints about one tilted direction (a planar chain seen at an angle), so every column w x (y - r_k) is perpendicular to w: rank 2 exactly. */
function parallelAxesFinger(angles: Vec, offset: Vec = [0, 0, 0]): FingerInput {
  const w = unit([0.3, -0.7, 0.65]);
  const at = (x: number, y: number, z: number): Vec => [offset[0] + x, offset[1] + y, offset[2] + z];
  return {
    name: 'planar',
    joints: [
      { name: 'base', role: 'base', axis: w, point: at(0.011, 0.023, -0.017), angle: angles[0] },
      { name: 'middle', role: 'other', axis: w, point: at(0.041, 0.002, 0.013), angle: angles[1] },
      { name: 'roll', role: 'roll', axis: w, point: at(0.057, 0.019, 0.029), angle: angles[2] },
    ],
    roller: { kind: 'sphere', radius: 0.009, center: at(0.066, 0.031, 0.035) },
  };
}

/** Three joint axes through one point c in general directions: every column w_k x (y - c) is perpendicular to y - c, rank 2 exactly. */
function concurrentAxesFinger(angles: Vec, offset: Vec): FingerInput {
  const c: Vec = [offset[0] + 0.004, offset[1] - 0.003, offset[2] + 0.002];
  return {
    name: 'wrist',
    joints: [
      { name: 'a', role: 'base', axis: unit([0.2, 0.9, -0.4]), point: c, angle: angles[0] },
      { name: 'b', role: 'other', axis: unit([-0.8, 0.1, 0.5]), point: c, angle: angles[1] },
      { name: 'c', role: 'roll', axis: unit([0.35, -0.45, 0.8]), point: c, angle: angles[2] },
    ],
    roller: { kind: 'sphere', radius: 0.004, center: [offset[0] + 0.009, offset[1] + 0.002, offset[2] - 0.004] },
  };
}

const POSTURES: Vec[] = Array.from({ length: 24 }, (_, k) => [0.37 * k - 2.1, 1.3 - 0.29 * k, 0.53 * k + 0.2]);

describe('numerical rank of the contact Jacobian', () => {
  it('parallel joint axes: rank 2 and an infinite condition number, also where rounding leaves a tiny sigma_3 (Golub & Van Loan, Matrix Computations, sec. 5.4.1: numerical rank)', () => {
    let roundingLeftSigma = 0;
    for (const angles of POSTURES) {
      const { full } = solveFinger(parallelAxesFinger(angles), ball(0.03, [0.01, 0.02, -0.01], [0.2, 0, 0.1]));
      if (full.singularValues[2] > 0) roundingLeftSigma++;
      expect(full.conditionNumber).toBe(Number.POSITIVE_INFINITY);
      expect(full.singularRatio).toBe(0);
      expect(full.rank).toBe(2);
      // sigma_3 lies within the stated tolerance, and the two kept values match the mathjs route.
      expect(full.singularValues[2]).toBeLessThanOrEqual(full.rankTolerance);
      expect(Array.from(full.singularValues.subarray(0, 2))).toBeNear(mathjsSingularValues(full.jacobian.data, 3).slice(0, 2), { rel: 1e-10 });
    }
    // Precondition of the check: some postures leave rounding in sigma_3 rather than an exact zero.
    expect(roundingLeftSigma).toBeGreaterThan(0);
  });

  it('concurrent joint axes far from the palm origin (0.6 m, lever arms of millimetres): rank 2, infinite condition number; eps sigma_max alone would miss it', () => {
    let beyondPlainTolerance = 0;
    for (const angles of POSTURES) {
      const { full } = solveFinger(concurrentAxesFinger(angles, [0.6, -0.2, 0.3]), ball(0.03, [0.01, 0.02, -0.01]));
      // The plain max(rows, cols) eps sigma_max cut (NumPy's matrix_rank default) for comparison.
      if (full.singularValues[2] > 3 * Number.EPSILON * full.singularValues[0]) beyondPlainTolerance++;
      expect(full.conditionNumber).toBe(Number.POSITIVE_INFINITY);
      expect(full.rank).toBe(2);
      expect(Array.from(full.singularValues.subarray(0, 2))).toBeNear(mathjsSingularValues(full.jacobian.data, 3).slice(0, 2), { rel: 1e-9 });
    }
    expect(beyondPlainTolerance).toBeGreaterThan(0);
  });

  it('contact on a joint axis in a tilted finger: that column is rounding only, rank 2', () => {
    // Pivot along the roller radius to the contact: its column w x (y - c) vanishes up to rounding of the tilted geometry.
    const n = unit([0.48, -0.6, 0.64]);
    const c: Vec = [0.05 + 0.04 * n[0], -0.02 + 0.04 * n[1], 0.01 + 0.04 * n[2]];
    const input: FingerInput = {
      name: 'tilted',
      joints: [
        { name: 'base', role: 'base', axis: unit([0.1, 0.8, 0.3]), point: [0.09, 0.01, -0.04], angle: 0 },
        { name: 'pivot', role: 'pivot', axis: n, point: c, angle: 0 },
        { name: 'roll', role: 'roll', axis: unit([-0.6, 0.2, 0.7]), point: c, angle: 0 },
      ],
      roller: { kind: 'sphere', radius: 0.01, center: c },
    };
    const object = ball(0.03, [0.01, 0.02, -0.01]);
    object.position.set([0.05, -0.02, 0.01]);
    const { full, contact } = solveFinger(input, object);
    expect(contact.normal).toBeNear(n, { abs: 1e-14 });
    expect(full.conditionNumber).toBe(Number.POSITIVE_INFINITY);
    expect(full.singularValues[2]).toBeLessThanOrEqual(full.rankTolerance);
    expect(full.rank).toBe(2);
  });

  it('nearly parallel axes (1e-4 rad apart) keep rank 3 and a finite condition number equal to the mathjs route (eigenvalues of J^T J)', () => {
    const input = parallelAxesFinger([0.3, -0.4, 0.5]);
    const w = input.joints[2].axis;
    // Tilt the last axis by 1e-4 rad about a direction perpendicular to it.
    const p = unit([w[1], -w[0], 0]);
    input.joints[2] = { ...input.joints[2], axis: unit([w[0] + 1e-4 * p[0], w[1] + 1e-4 * p[1], w[2] + 1e-4 * p[2]]) };
    const { full } = solveFinger(input, ball(0.03, [0.01, 0.02, -0.01]));
    const expected = mathjsSingularValues(full.jacobian.data, 3);
    expect(full.rank).toBe(3);
    expect(Number.isFinite(full.conditionNumber)).toBe(true);
    // sigma_3^2 is ~1e-10 of sigma_1^2, so the eigenvalue route keeps about six digits of sigma_3.
    expect(Array.from(full.singularValues)).toBeNear(expected, { rel: 1e-5 });
    expect(full.conditionNumber).toBeNear(expected[0] / expected[2], { rel: 1e-5 });
    expect(full.singularRatio).toBeNear(expected[2] / expected[0], { rel: 1e-5 });
  });
});

describe('numericalRank and conditionNumber', () => {
  it('count sigma > max(rows, cols) eps sigma_max by default: a sigma of 1e-17 sigma_max is rank loss, 1e-10 is not (Golub & Van Loan, sec. 5.4.1; NumPy matrix_rank default)', () => {
    expect(conditionNumber([1, 0.5, 1e-17])).toBe(Number.POSITIVE_INFINITY);
    expect(conditionNumber([2, 1, 2e-10])).toBeNear(1e10, { rel: 1e-12 });
    expect(numericalRank([1, 0.5, 1e-17], 3, 3 * Number.EPSILON)).toBe(2);
    expect(numericalRank([1, 0.5, 1e-10], 3, 3 * Number.EPSILON)).toBe(3);
  });

  it('takes a stated tolerance instead of the default', () => {
    expect(conditionNumber([1, 1e-12], 2, 1e-11)).toBe(Number.POSITIVE_INFINITY);
    expect(conditionNumber([1, 1e-12], 2, 1e-13)).toBeNear(1e12, { rel: 1e-12 });
  });
});
