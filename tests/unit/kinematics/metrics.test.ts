import { describe, expect, it } from 'vitest';
import { glMatrix, mat3 as glMat3, quat as glQuat, vec4 as glVec4, type vec3 as GlVec3 } from 'gl-matrix';
import {
  ROTATION_METRICS,
  geodesicAngle,
  quaternionDifferenceNorm,
  quaternionInnerProductAngle,
  quaternionInnerProductDistance,
  rotationDistances,
  rotationMatrixDeviation,
} from '../../../src/lib/kinematics/metrics';
import { createRandom, nextGaussian, type RandomSource } from '../../../src/lib/kinematics/random';

// Source: D. Q. Huynh, "Metrics for 3D Rotations: Comparison and Analysis", J. Math. Imaging Vis. 35 (2009) 155-164:
// the definitions and ranges of Phi2..Phi6, and that Phi3 and Phi6 are functionally equivalent with Phi6 = 2 Phi3
// (section on functional equivalence; from memory). The other closed forms below are derived in the comments from
// |q1 +- q2|^2 = 2 +- 2 q1.q2, cos(theta/2) = |q1.q2| and ||I - R||_F^2 = 6 - 2 tr R = 4 - 4 cos(theta).
// Reference library: gl-matrix 3.4 (quat.getAngle, mat3.fromQuat, mat3.frob), double precision.
glMatrix.setMatrixArrayType(Array);

function randomQuat(random: RandomSource): number[] {
  const q = [nextGaussian(random), nextGaussian(random), nextGaussian(random), nextGaussian(random)];
  const n = Math.hypot(...q);
  return q.map((x) => x / n);
}

function forEachPair(seed: number, count: number, check: (q1: number[], q2: number[]) => void): void {
  const random = createRandom(seed);
  for (let i = 0; i < count; i++) {
    const q1 = randomQuat(random);
    // Every fourth pair is near-identical, every fourth near-opposite, to reach both ends of the ranges.
    const q2 = i % 4 === 1 ? q1.map((x, k) => x + 1e-7 * (k - 1.5)) : i % 4 === 2 ? q1.map((x) => -x) : randomQuat(random);
    const n2 = Math.hypot(...q2);
    check(q1, q2.map((x) => x / n2));
  }
}

const halfTurn = (axis: number[], angle: number) => glQuat.setAxisAngle(glQuat.create(), axis as GlVec3, angle) as number[];

describe('quaternionDifferenceNorm', () => {
  it('equals min(|q1 - q2|, |q1 + q2|) by gl-matrix vec4.subtract/add/length and lies in [0, sqrt 2] (Huynh 2009, Phi2)', () => {
    forEachPair(1, 400, (q1, q2) => {
      const minus = glVec4.length(glVec4.subtract(glVec4.create(), q1 as glVec4, q2 as glVec4));
      const plus = glVec4.length(glVec4.add(glVec4.create(), q1 as glVec4, q2 as glVec4));
      const value = quaternionDifferenceNorm(q1, q2);
      expect(value).toBeCloseTo(Math.min(minus, plus), 14);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(Math.SQRT2 + 1e-15);
    });
  });

  it('is 2 sin(Phi3 / 2), since |q1 - q2|^2 = 2 - 2 cos(Phi3) on the nearer sign', () => {
    forEachPair(2, 200, (q1, q2) => {
      expect(quaternionDifferenceNorm(q1, q2)).toBeCloseTo(2 * Math.sin(quaternionInnerProductAngle(q1, q2) / 2), 12);
    });
  });

  it('reaches sqrt 2 for a half turn and 0 for q against -q', () => {
    expect(quaternionDifferenceNorm([0, 0, 0, 1], [1, 0, 0, 0])).toBeCloseTo(Math.SQRT2, 15);
    expect(quaternionDifferenceNorm([0.5, 0.5, 0.5, 0.5], [-0.5, -0.5, -0.5, -0.5])).toBe(0);
  });
});

describe('quaternionInnerProductAngle', () => {
  it('equals arccos|q1 . q2| away from 0 and lies in [0, pi/2] (Huynh 2009, Phi3)', () => {
    forEachPair(3, 400, (q1, q2) => {
      const value = quaternionInnerProductAngle(q1, q2);
      const dot = Math.abs(glQuat.dot(q1 as glQuat, q2 as glQuat));
      if (dot < 0.99) expect(value).toBeCloseTo(Math.acos(dot), 12);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(Math.PI / 2 + 1e-15);
    });
  });

  it('is half of the geodesic angle, Phi6 = 2 Phi3 (Huynh 2009, functional equivalence of Phi3 and Phi6)', () => {
    forEachPair(4, 200, (q1, q2) => expect(2 * quaternionInnerProductAngle(q1, q2)).toBeCloseTo(geodesicAngle(q1, q2), 14));
  });
});

describe('quaternionInnerProductDistance', () => {
  it('equals 1 - |q1 . q2| (gl-matrix quat.dot), lies in [0, 1], and equals Phi2^2 / 2 (Huynh 2009, Phi4)', () => {
    forEachPair(5, 400, (q1, q2) => {
      const value = quaternionInnerProductDistance(q1, q2);
      expect(value).toBeCloseTo(1 - Math.abs(glQuat.dot(q1 as glQuat, q2 as glQuat)), 14);
      expect(value).toBeCloseTo(quaternionDifferenceNorm(q1, q2) ** 2 / 2, 14);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(1);
    });
  });

  it('breaks the triangle inequality: identity, quarter turn and half turn about z give 1 > 2 (1 - cos 45 deg)', () => {
    const a = [0, 0, 0, 1];
    const b = halfTurn([0, 0, 1], Math.PI / 2);
    const c = halfTurn([0, 0, 1], Math.PI);
    const direct = quaternionInnerProductDistance(a, c);
    const viaB = quaternionInnerProductDistance(a, b) + quaternionInnerProductDistance(b, c);
    expect(direct).toBeCloseTo(1, 15);
    expect(viaB).toBeCloseTo(2 * (1 - Math.SQRT1_2), 15);
    expect(direct).toBeGreaterThan(viaB);
  });
});

describe('rotationMatrixDeviation', () => {
  it('equals ||I - R1 R2^T||_F built from gl-matrix mat3.fromQuat, multiply, transpose and frob, in [0, 2 sqrt 2] (Huynh 2009, Phi5)', () => {
    forEachPair(6, 400, (q1, q2) => {
      const r1 = glMat3.fromQuat(glMat3.create(), q1 as glQuat);
      const r2 = glMat3.fromQuat(glMat3.create(), q2 as glQuat);
      const product = glMat3.multiply(glMat3.create(), r1, glMat3.transpose(glMat3.create(), r2));
      const expected = glMat3.frob(glMat3.subtract(glMat3.create(), glMat3.create(), product));
      const value = rotationMatrixDeviation(q1, q2);
      expect(value).toBeCloseTo(expected, 7);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(2 * Math.SQRT2 + 1e-15);
    });
  });

  it('is 2 sqrt2 sin(theta / 2) = 2 sqrt(2 Phi4 (2 - Phi4)), since ||I - R||_F^2 = 4 - 4 cos(theta)', () => {
    forEachPair(7, 200, (q1, q2) => {
      const phi4 = quaternionInnerProductDistance(q1, q2);
      expect(rotationMatrixDeviation(q1, q2)).toBeCloseTo(2 * Math.SQRT2 * Math.sin(geodesicAngle(q1, q2) / 2), 12);
      // 1 - |q1.q2| cancels for nearly equal rotations, so the Phi4 form is only checked away from them.
      if (phi4 > 1e-6) expect(rotationMatrixDeviation(q1, q2)).toBeCloseTo(2 * Math.sqrt(2 * phi4 * (2 - phi4)), 9);
    });
  });
});

describe('geodesicAngle', () => {
  it('equals gl-matrix quat.getAngle and lies in [0, pi] (Huynh 2009, Phi6)', () => {
    forEachPair(8, 400, (q1, q2) => {
      const value = geodesicAngle(q1, q2);
      const expected = glQuat.getAngle(q1 as glQuat, q2 as glQuat);
      // getAngle uses acos(2 dot^2 - 1), which loses digits near 0 and pi (and returns NaN once
      // rounding pushes the argument past 1); compare loosely there.
      if (Number.isNaN(expected)) {
        expect(value).toBeLessThan(1e-7);
        return;
      }
      const digits = expected > 1e-3 && expected < Math.PI - 1e-3 ? 10 : 3;
      expect(value).toBeCloseTo(expected, digits);
      expect(value).toBeGreaterThanOrEqual(0);
      expect(value).toBeLessThanOrEqual(Math.PI + 1e-15);
    });
  });

  it('recovers tiny and near-half-turn angles built with gl-matrix setAxisAngle to full relative precision', () => {
    const axis = [0.48, -0.6, 0.64];
    const q0 = randomQuat(createRandom(9));
    for (const angle of [1e-12, 1e-8, 1e-3, 1, 3, Math.PI - 1e-9]) {
      const q = glQuat.multiply(glQuat.create(), halfTurn(axis, angle) as glQuat, q0 as glQuat) as number[];
      expect(Math.abs(geodesicAngle(q, q0) - angle)).toBeLessThanOrEqual(4e-16 * Math.max(1, angle) + 2e-15 * angle);
    }
  });

  it('is bi-invariant and blind to the sign of q: Phi6(r q1 s, r q2 s) = Phi6(-q1, q2) = Phi6(q1, q2)', () => {
    const random = createRandom(10);
    forEachPair(11, 100, (q1, q2) => {
      const r = randomQuat(random) as glQuat;
      const s = randomQuat(random) as glQuat;
      const moved = (q: number[]) => glQuat.multiply(glQuat.create(), glQuat.multiply(glQuat.create(), r, q as glQuat), s) as number[];
      expect(geodesicAngle(moved(q1), moved(q2))).toBeCloseTo(geodesicAngle(q1, q2), 12);
      expect(geodesicAngle(q1.map((x) => -x), q2)).toBeCloseTo(geodesicAngle(q1, q2), 15);
    });
  });
});

describe('metric axioms', () => {
  it('Phi2, Phi3, Phi5, Phi6 are symmetric and satisfy the triangle inequality on random triples (Huynh 2009: metrics on SO(3); from memory)', () => {
    const random = createRandom(12);
    for (const f of [quaternionDifferenceNorm, quaternionInnerProductAngle, rotationMatrixDeviation, geodesicAngle]) {
      for (let i = 0; i < 300; i++) {
        const a = randomQuat(random);
        const b = randomQuat(random);
        const c = randomQuat(random);
        expect(f(a, b)).toBeCloseTo(f(b, a), 14);
        expect(f(a, c)).toBeLessThanOrEqual(f(a, b) + f(b, c) + 1e-12);
        expect(f(a, a)).toBeLessThan(1e-7);
      }
    }
  });
});

describe('rotationDistances', () => {
  it('writes Phi2..Phi6 in ROTATION_METRICS order, equal to the single functions, with each maximum as listed', () => {
    const singles = [quaternionDifferenceNorm, quaternionInnerProductAngle, quaternionInnerProductDistance, rotationMatrixDeviation, geodesicAngle];
    forEachPair(13, 100, (q1, q2) => {
      const out = rotationDistances(q1, q2, new Float64Array(5));
      expect(out).toBeNear(singles.map((f) => f(q1, q2)), { digits: 15 });
    });
    const half = rotationDistances([0, 0, 0, 1], [0, 1, 0, 0], [0, 0, 0, 0, 0]);
    expect(half).toBeNear(ROTATION_METRICS.map((metric) => metric.max), { digits: 14 });
    expect(ROTATION_METRICS.map((m) => m.key)).toEqual(['phi2', 'phi3', 'phi4', 'phi5', 'phi6']);
  });
});
