import { describe, expect, it } from 'vitest';
import { glMatrix, quat as glQuat, vec3 as glVec3 } from 'gl-matrix';
import { expMap, integratePose, logMap, poseError } from '../../../src/lib/kinematics/so3';
import { toMatrix3 } from '../../../src/lib/kinematics/quat';
import { createRandom, nextGaussian, nextUniform, type RandomSource } from '../../../src/lib/kinematics/random';

// Reference: gl-matrix 3.4 quat.setAxisAngle / getAxisAngle / multiply (double precision), used only as an outside check;
// Rodrigues' formula as printed in Lynch & Park, "Modern Robotics" (2017), eq. (3.51), and Murray, Li & Sastry (1994), eq. (2.14).
glMatrix.setMatrixArrayType(Array);

function randomUnitVector(random: RandomSource): number[] {
  const v = [nextGaussian(random), nextGaussian(random), nextGaussian(random)];
  const n = Math.hypot(v[0]!, v[1]!, v[2]!);
  return v.map((x) => x / n);
}

function randomRotationVector(random: RandomSource, maxAngle = Math.PI): number[] {
  const angle = maxAngle * nextUniform(random);
  return randomUnitVector(random).map((x) => x * angle);
}

function randomQuat(random: RandomSource): number[] {
  const q = [nextGaussian(random), nextGaussian(random), nextGaussian(random), nextGaussian(random)];
  const n = Math.hypot(...q);
  return q.map((x) => x / n);
}

/** Rodrigues: R = I + sin(t) [w] + (1 - cos(t)) [w]^2 for unit w (Lynch & Park eq. 3.51), row-major. */
function rodrigues(axis: number[], angle: number): number[] {
  const [x, y, z] = axis as [number, number, number];
  const k = [0, -z, y, z, 0, -x, -y, x, 0];
  const k2 = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let t = 0; t < 3; t++) k2[i * 3 + j]! += k[i * 3 + t]! * k[t * 3 + j]!;
  return k.map((_, i) => (i % 4 === 0 ? 1 : 0) + Math.sin(angle) * k[i]! + (1 - Math.cos(angle)) * k2[i]!);
}

/** Lynch & Park Sec. 3.2.3.3 matrix logarithm for 0 < angle < pi: angle = acos((tr R - 1)/2), [w] = (R - R^T)/(2 sin angle). */
function matrixLog(r: number[]): number[] {
  const angle = Math.acos((r[0]! + r[4]! + r[8]! - 1) / 2);
  const s = 2 * Math.sin(angle);
  return [(r[7]! - r[5]!) / s, (r[2]! - r[6]!) / s, (r[3]! - r[1]!) / s].map((x) => x * angle);
}

describe('expMap', () => {
  it('equals gl-matrix quat.setAxisAngle(axis, angle) for r = axis * angle', () => {
    const random = createRandom(1);
    for (let i = 0; i < 200; i++) {
      const axis = randomUnitVector(random);
      const angle = 4 * Math.PI * (nextUniform(random) - 0.5);
      const expected = glQuat.setAxisAngle(glQuat.create(), axis as glVec3, angle);
      expect(expMap(axis.map((x) => x * angle))).toBeNear(expected as number[], { abs: 1e-15 });
    }
  });

  it('gives the rotation matrix of Rodrigues formula (Lynch & Park eq. 3.51; Murray, Li & Sastry eq. 2.14)', () => {
    const random = createRandom(2);
    for (let i = 0; i < 100; i++) {
      const axis = randomUnitVector(random);
      const angle = Math.PI * nextUniform(random);
      expect(toMatrix3(expMap(axis.map((x) => x * angle)))).toBeNear(rodrigues(axis, angle), { abs: 1e-14 });
    }
  });

  it('is exact to rounding at tiny angles (series branch), matching sin(angle/2)/angle in long form at the switch', () => {
    expect(expMap([0, 0, 0])).toBeNear([0, 0, 0, 1], { abs: 0 });
    for (const angle of [1e-12, 1e-8, 0.99e-4, 1.01e-4]) {
      const expected = glQuat.setAxisAngle(glQuat.create(), [0.6, 0, 0.8], angle) as number[];
      const actual = expMap([0.6 * angle, 0, 0.8 * angle]);
      for (let i = 0; i < 4; i++) expect(Math.abs(actual[i]! - expected[i]!)).toBeLessThanOrEqual(1e-16 * Math.max(angle, Math.abs(expected[i]!)) * 4);
    }
  });

  it('writes into a separate output and leaves the input untouched', () => {
    const r = Float64Array.of(0.1, 0.2, 0.3);
    const out = new Float64Array(4);
    expect(expMap(r, out)).toBe(out);
    expect(Array.from(r)).toEqual([0.1, 0.2, 0.3]);
  });
});

describe('logMap', () => {
  it('inverts gl-matrix setAxisAngle for angles in (0, pi), and agrees with the matrix logarithm (Lynch & Park Sec. 3.2.3.3)', () => {
    const random = createRandom(3);
    for (let i = 0; i < 200; i++) {
      const axis = randomUnitVector(random);
      const angle = 0.01 + (Math.PI - 0.02) * nextUniform(random);
      const q = glQuat.setAxisAngle(glQuat.create(), axis as glVec3, angle) as number[];
      expect(logMap(q)).toBeNear(axis.map((x) => x * angle), { abs: 1e-13 });
      expect(logMap(q)).toBeNear(matrixLog(toMatrix3(q)), { abs: 1e-11 });
    }
  });

  it('agrees with gl-matrix getAxisAngle on random quaternions, taking the shorter way (angle in [0, pi])', () => {
    const random = createRandom(4);
    for (let i = 0; i < 200; i++) {
      const q = randomQuat(random);
      const axis = glVec3.create();
      let angle = glQuat.getAxisAngle(axis, q as glQuat);
      // getAxisAngle returns angles in [0, 2 pi]; beyond pi the same rotation is -axis turned by 2 pi - angle.
      if (angle > Math.PI) angle -= 2 * Math.PI;
      const r = logMap(q);
      expect(r).toBeNear(Array.from(axis, (x) => x * angle), { abs: 1e-12 });
      expect(Math.hypot(r[0]!, r[1]!, r[2]!)).toBeLessThanOrEqual(Math.PI + 1e-15);
      expect(logMap(q.map((x) => -x))).toBeNear(r, { abs: 1e-15 });
    }
  });

  it('is accurate near the identity: log(exp(r)) = r to 1e-15 relative for |r| from 1e-12 to 1e-3', () => {
    for (const angle of [1e-12, 1e-9, 1e-6, 0.99e-4, 1.01e-4, 1e-3]) {
      const r = [0.48 * angle, -0.6 * angle, 0.64 * angle];
      const back = logMap(expMap(r));
      for (let i = 0; i < 3; i++) expect(Math.abs(back[i]! - r[i]!)).toBeLessThanOrEqual(4e-16 * angle);
    }
  });

  it('is accurate near pi: exactly pi about z, and pi - 1e-9 from both sides of w = 0', () => {
    expect(logMap([0, 0, 1, 0])).toBeNear([0, 0, Math.PI], { abs: 1e-15 });
    for (const angle of [Math.PI - 1e-9, Math.PI + 1e-9]) {
      const q = glQuat.setAxisAngle(glQuat.create(), [0, 1, 0], angle) as number[];
      const expected = angle > Math.PI ? -(2 * Math.PI - angle) : angle;
      expect(logMap(q)).toBeNear([0, expected, 0], { abs: 1e-14 });
    }
  });

  it('round-trips exp(log(q)) = +-q for random unit quaternions', () => {
    const random = createRandom(5);
    for (let i = 0; i < 200; i++) {
      const q = randomQuat(random);
      expect(expMap(logMap(q))).toBeNear(q, { abs: 1e-14, upToSign: true });
    }
  });

  it('writes into a separate output and leaves the input untouched', () => {
    const q = Float64Array.of(0, 0, Math.SQRT1_2, -Math.SQRT1_2);
    const out = new Float64Array(3);
    expect(logMap(q, out)).toBe(out);
    expect(Array.from(q)).toEqual([0, 0, Math.SQRT1_2, -Math.SQRT1_2]);
  });
});

describe('poseError', () => {
  it('is the position difference and the gl-matrix axis-angle of q_target conj(q), shortest path', () => {
    const random = createRandom(6);
    for (let i = 0; i < 100; i++) {
      const q = randomQuat(random);
      const target = randomQuat(random);
      const p = [nextGaussian(random), nextGaussian(random), nextGaussian(random)];
      const pt = [nextGaussian(random), nextGaussian(random), nextGaussian(random)];
      const relative = glQuat.multiply(glQuat.create(), target as glQuat, glQuat.conjugate(glQuat.create(), q as glQuat));
      const axis = glVec3.create();
      let angle = glQuat.getAxisAngle(axis, relative);
      if (angle > Math.PI) angle -= 2 * Math.PI;
      const error = poseError(p, q, pt, target, new Float64Array(6));
      expect(error.subarray(0, 3)).toBeNear([pt[0]! - p[0]!, pt[1]! - p[1]!, pt[2]! - p[2]!], { abs: 1e-15 });
      expect(error.subarray(3)).toBeNear(Array.from(axis, (x) => x * angle), { abs: 1e-11 });
    }
  });

  it('is zero at the target, and turning the current orientation by the error lands on the target', () => {
    const random = createRandom(7);
    const q = randomQuat(random);
    const target = randomQuat(random);
    expect(poseError([1, 2, 3], q, [1, 2, 3], q, [0, 0, 0, 0, 0, 0])).toBeNear([0, 0, 0, 0, 0, 0], { abs: 1e-15 });
    const e = poseError([0, 0, 0], q, [0, 0, 0], target, new Float64Array(6));
    expect(glQuat.multiply(glQuat.create(), expMap(e.subarray(3)) as glQuat, q as glQuat) as number[]).toBeNear(target, { abs: 1e-14, upToSign: true });
  });

  it('leaves its inputs untouched', () => {
    const q = [0, 0, Math.sin(0.3), Math.cos(0.3)];
    const t = [Math.sin(0.2), 0, 0, Math.cos(0.2)];
    const p = [1, 2, 3];
    poseError(p, q, [0, 0, 0], t, new Float64Array(6));
    expect(q).toEqual([0, 0, Math.sin(0.3), Math.cos(0.3)]);
    expect(t).toEqual([Math.sin(0.2), 0, 0, Math.cos(0.2)]);
    expect(p).toEqual([1, 2, 3]);
  });
});

describe('integratePose', () => {
  it('over N steps at constant w equals exp(w T) q0, the one-parameter subgroup exp((s+t)w) = exp(sw) exp(tw) (Lynch & Park Sec. 3.2.3), via gl-matrix', () => {
    const random = createRandom(8);
    const w = randomRotationVector(random, 2);
    const v = [0.1, -0.2, 0.05];
    const q0 = randomQuat(random);
    const p = [0.3, 0.1, -0.2];
    const q = [...q0];
    const dt = 0.001;
    const steps = 1000;
    for (let i = 0; i < steps; i++) integratePose(p, q, v, w, dt, p, q);
    const angle = Math.hypot(w[0]!, w[1]!, w[2]!) * dt * steps;
    const axis = w.map((x) => x / Math.hypot(w[0]!, w[1]!, w[2]!));
    const expected = glQuat.multiply(glQuat.create(), glQuat.setAxisAngle(glQuat.create(), axis as glVec3, angle), q0 as glQuat);
    expect(q).toBeNear(expected as number[], { abs: 1e-12, upToSign: true });
    expect(p).toBeNear([0.3 + 0.1, 0.1 - 0.2, -0.2 + 0.05], { abs: 1e-13 });
    expect(Math.hypot(...q)).toBeCloseTo(1, 15);
  });

  it('writes separate outputs without touching the inputs', () => {
    const p = [1, 2, 3];
    const q = [0, 0, 0, 1];
    const outP = [0, 0, 0];
    const outQ = new Float64Array(4);
    integratePose(p, q, [1, 0, 0], [0, 0, Math.PI], 0.5, outP, outQ);
    expect(p).toEqual([1, 2, 3]);
    expect(q).toEqual([0, 0, 0, 1]);
    expect(outP).toBeNear([1.5, 2, 3], { abs: 0 });
    expect(outQ).toBeNear([0, 0, Math.SQRT1_2, Math.SQRT1_2], { abs: 1e-15 });
  });
});
