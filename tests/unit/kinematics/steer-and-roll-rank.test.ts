import { describe, expect, it } from 'vitest';
import { numericalRank } from '../../../src/lib/kinematics/linalg';
import type { FingerInput } from '../../../src/lib/sheet/types';
import { ball, solveFinger } from './single-finger';

type Vec = [number, number, number];

function unit(v: Vec): Vec {
  const length = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / length, v[1] / length, v[2] / length];
}

const POSTURES: Vec[] = Array.from({ length: 24 }, (_, k) => [0.37 * k - 2.1, 1.3 - 0.29 * k, 0.53 * k + 0.2]);

/**
 * Base, pivot and roll axes through one point c far from the palm origin, in general directions: every column
 * w_k x (y - c), also after the pivot turns about its line through c, is perpendicular to y - c, so the Jacobian
 * after steering has rank 2 exactly and rounding alone is left in sigma_3.
 */
function concurrentSteeringFinger(angles: Vec, offset: Vec): FingerInput {
  const c: Vec = [offset[0] + 0.004, offset[1] - 0.003, offset[2] + 0.002];
  return {
    name: 'wrist',
    joints: [
      { name: 'base', role: 'base', axis: unit([0.2, 0.9, -0.4]), point: c, angle: angles[0] },
      { name: 'pivot', role: 'pivot', axis: unit([-0.8, 0.1, 0.5]), point: c, angle: angles[1] },
      { name: 'roll', role: 'roll', axis: unit([0.35, -0.45, 0.8]), point: c, angle: angles[2] },
    ],
    roller: { kind: 'sphere', radius: 0.004, center: [offset[0] + 0.009, offset[1] + 0.002, offset[2] - 0.004] },
  };
}

const COAXIAL_CENTRE: Vec = [0.55, -0.32, 0.41];
const COAXIAL_AXIS = unit([0.3, 0.7, -0.2]);
const COAXIAL_PIVOT = unit([0.48, -0.6, 0.64]);

/**
 * Base and roll joints about one line (axis w through the roller centre c), the pivot through c so that it does
 * not drive once the object sits along it: the two drive columns w x (y - c) coincide up to the rounding of forward
 * kinematics far from the palm origin, rank 1. The object is at rest, so steering leaves the pivot where it is.
 */
function coaxialDriveFinger(angles: Vec): FingerInput {
  const n = COAXIAL_PIVOT, c = COAXIAL_CENTRE, w = COAXIAL_AXIS;
  return {
    name: 'coaxial',
    joints: [
      { name: 'base', role: 'base', axis: w, point: c, angle: angles[0] },
      { name: 'pivot', role: 'pivot', axis: n, point: c, angle: 0 },
      { name: 'roll', role: 'roll', axis: w, point: c, angle: angles[2] },
    ],
    roller: { kind: 'sphere', radius: 0.01, center: c },
  };
}

describe('rank after steering judged with the finger\'s stated rank tolerance', () => {
  it('concurrent axes far from the palm origin: conditionAfter is infinite like the full condition number, also where sigma_3 after steering exceeds eps sigma_max (Golub & Van Loan, Matrix Computations, sec. 5.4.1: numerical rank)', () => {
    let beyondPlainTolerance = 0;
    for (const angles of POSTURES) {
      const { full, steer } = solveFinger(concurrentSteeringFinger(angles, [0.6, -0.2, 0.3]), ball(0.03, [0.01, 0.02, -0.01]));
      const s = steer.singularValuesAfter;
      // The plain max(rows, cols) eps sigma_max cut (NumPy's matrix_rank default), which conditionNumber uses without a tolerance.
      if (s[2] > 3 * Number.EPSILON * s[0]) beyondPlainTolerance++;
      expect(s[2]).toBeLessThanOrEqual(full.rankTolerance);
      expect(full.conditionNumber).toBe(Number.POSITIVE_INFINITY);
      expect(steer.conditionAfter).toBe(Number.POSITIVE_INFINITY);
    }
    // Precondition: some postures leave rounding above the plain cut, where the two tolerances disagree.
    expect(beyondPlainTolerance).toBeGreaterThan(0);
  });

  it('coaxial base and roll joints: the drive ratio is exactly 0 where the drive columns lose rank, as singularRatio is for the full Jacobian (Golub & Van Loan, sec. 5.4.1)', () => {
    let roundingLeftSigma = 0;
    for (const angles of POSTURES) {
      // The base turns the pivot axis about w (Rodrigues' formula, from memory); the object sits 0.04 m along the turned axis.
      const n = COAXIAL_PIVOT, w = COAXIAL_AXIS, cos = Math.cos(angles[0]), sin = Math.sin(angles[0]);
      const wn = w[0] * n[0] + w[1] * n[1] + w[2] * n[2];
      const cross: Vec = [w[1] * n[2] - w[2] * n[1], w[2] * n[0] - w[0] * n[2], w[0] * n[1] - w[1] * n[0]];
      const turned = [0, 1, 2].map((i) => n[i] * cos + cross[i] * sin + w[i] * wn * (1 - cos));
      const object = ball(0.03, [0, 0, 0]);
      object.position.set(COAXIAL_CENTRE.map((x, i) => x - 0.04 * turned[i]));
      const { full, steer } = solveFinger(coaxialDriveFinger(angles), object);
      expect(steer.available).toBe(true);
      expect(steer.pivotDrives).toBe(false);
      expect(steer.driveColumnCount).toBe(2);
      // The second drive column is the first one again: sigma_2 is rounding within the stated tolerance.
      expect(numericalRank(steer.driveSingularValues, 2, full.rankTolerance)).toBe(1);
      if (steer.driveSingularValues[1] > 0) roundingLeftSigma++;
      expect(steer.driveRatio).toBe(0);
    }
    // Precondition: rounding leaves a non-zero sigma_2 in some postures, where sigma_2 / sigma_1 is not 0 by itself.
    expect(roundingLeftSigma).toBeGreaterThan(0);
  });
});
