import { describe, expect, it } from 'vitest';
import { glMatrix, mat3 as glMat3, quat as glQuat, vec3 as glVec3 } from 'gl-matrix';
import {
  conjugate, copy, equals, fromAxisAngle, fromMatrix3, fromSheet, identity, length, multiply,
  normalize, rotate, rotateInverse, slerp, toAxisAngle, toMatrix3, toSheet,
} from '../../../src/lib/kinematics/quat';

// Double precision in gl-matrix so it can serve as a reference to 12 digits.
glMatrix.setMatrixArrayType(Array);

// Reference: gl-matrix 3.4 (quat, mat3, vec3), a general-purpose library used only as an outside check.
// gl-matrix stores quaternions [x, y, z, w] like us; its mat3 is column-major, ours row-major.

function glq(q: ArrayLike<number>): glQuat {
  return glQuat.fromValues(q[0], q[1], q[2], q[3]);
}

const axisA = [1 / Math.sqrt(14), 2 / Math.sqrt(14), 3 / Math.sqrt(14)];
const axisB = [0.6, 0, -0.8];
const qa = fromAxisAngle(axisA, 0.9);
const qb = fromAxisAngle(axisB, -2.3);
const samples = [qa, qb, fromAxisAngle([0, 0, 1], Math.PI), fromAxisAngle([1, 0, 0], 3.1), fromAxisAngle([0, 1, 0], 2.9), [0, 0, 0, 1]];

describe('identity', () => {
  it('is [0, 0, 0, 1] like gl-matrix quat.create', () => expect(identity()).toBeNear(glQuat.create(), { digits: 12 }));
});

describe('copy', () => {
  it('copies into separate output', () => {
    const c = copy(qa);
    expect(c).toEqual(qa);
    expect(c).not.toBe(qa);
  });
});

describe('multiply', () => {
  it('matches gl-matrix quat.multiply', () => expect(multiply(qa, qb)).toBeNear(glQuat.multiply(glQuat.create(), glq(qa), glq(qb)), { digits: 12 }));
  it('applies b first, then a: rotate(ab, v) = rotate(a, rotate(b, v))', () => {
    const v = [0.3, -1.2, 2];
    expect(rotate(multiply(qa, qb), v)).toBeNear(rotate(qa, rotate(qb, v)), { digits: 12 });
  });
  it('output may alias an input, and inputs stay untouched', () => {
    const a = [...qa], b = [...qb];
    multiply(a, b, a);
    expect(a).toBeNear(glQuat.multiply(glQuat.create(), glq(qa), glq(qb)), { digits: 12 });
    expect(b).toEqual(qb);
  });
});

describe('conjugate', () => {
  it('matches gl-matrix quat.conjugate', () => expect(conjugate(qa)).toBeNear(glQuat.conjugate(glQuat.create(), glq(qa)), { digits: 12 }));
  it('q q* is the identity for a unit quaternion', () => expect(multiply(qa, conjugate(qa))).toBeNear([0, 0, 0, 1], { digits: 12 }));
});

describe('length', () => {
  it('matches gl-matrix quat.length', () => expect(length([1, 2, 3, 4])).toBeCloseTo(glQuat.length(glq([1, 2, 3, 4])), 14));
});

describe('normalize', () => {
  it('matches gl-matrix quat.normalize', () => expect(normalize([1, -2, 3, 4])).toBeNear(glQuat.normalize(glQuat.create(), glq([1, -2, 3, 4])), { digits: 12 }));
  it('turns the zero quaternion into the identity', () => expect(normalize([0, 0, 0, 0])).toEqual([0, 0, 0, 1]));
});

describe('fromAxisAngle', () => {
  it('matches gl-matrix quat.setAxisAngle', () =>
    expect(fromAxisAngle(axisA, 0.9)).toBeNear(glQuat.setAxisAngle(glQuat.create(), glVec3.fromValues(axisA[0], axisA[1], axisA[2]), 0.9), { digits: 12 }));
  it('writes into a Float64Array', () => {
    const out = new Float64Array(4);
    expect(fromAxisAngle([0, 0, 1], Math.PI / 2, out)).toBe(out);
    expect(out).toBeNear([0, 0, Math.SQRT1_2, Math.SQRT1_2], { digits: 15 });
  });
});

describe('toAxisAngle', () => {
  it('agrees with gl-matrix quat.getAxisAngle for angles below pi', () => {
    const axis = [0, 0, 0];
    const glAxis = glVec3.create();
    const angle = toAxisAngle(qa, axis);
    expect(angle).toBeCloseTo(glQuat.getAxisAngle(glAxis, glq(qa)), 12);
    expect(axis).toBeNear(glAxis, { digits: 12 });
  });
  it('takes the w >= 0 representative so the angle stays in [0, pi]', () => {
    const axis = [0, 0, 0];
    expect(toAxisAngle(qb, axis)).toBeCloseTo(2.3, 12);
    expect(axis).toBeNear([-0.6, 0, 0.8], { digits: 12 });
    expect(toAxisAngle([-qa[0], -qa[1], -qa[2], -qa[3]], axis)).toBeCloseTo(0.9, 12);
    expect(axis).toBeNear(axisA, { digits: 12 });
  });
  it('gives angle 0 and the x axis for the identity', () => {
    const axis = [9, 9, 9];
    expect(toAxisAngle([0, 0, 0, 1], axis)).toBe(0);
    expect(axis).toEqual([1, 0, 0]);
  });
});

describe('rotate', () => {
  it('matches gl-matrix vec3.transformQuat', () => {
    const v = [0.3, -1.2, 2];
    for (const q of samples) expect(rotate(q, v)).toBeNear(glVec3.transformQuat(glVec3.create(), glVec3.fromValues(v[0], v[1], v[2]), glq(q)), { digits: 12 });
  });
  it('turns x into y by a quarter turn about z (right-hand rule, common practice)', () =>
    expect(rotate(fromAxisAngle([0, 0, 1], Math.PI / 2), [1, 0, 0])).toBeNear([0, 1, 0], { digits: 15 }));
  it('output may alias the input vector', () => {
    const v = [0.3, -1.2, 2];
    rotate(qa, v, v);
    expect(v).toBeNear(glVec3.transformQuat(glVec3.create(), glVec3.fromValues(0.3, -1.2, 2), glq(qa)), { digits: 12 });
  });
});

describe('rotateInverse', () => {
  it('undoes rotate', () => {
    const v = [0.3, -1.2, 2];
    expect(rotateInverse(qa, rotate(qa, v))).toBeNear(v, { digits: 12 });
  });
  it('matches gl-matrix vec3.transformQuat with the conjugate', () => {
    const v = [0.3, -1.2, 2];
    expect(rotateInverse(qb, v)).toBeNear(glVec3.transformQuat(glVec3.create(), glVec3.fromValues(0.3, -1.2, 2), glQuat.conjugate(glQuat.create(), glq(qb))), { digits: 12 });
  });
});

describe('toMatrix3', () => {
  it('is the transpose of gl-matrix mat3.fromQuat (column-major there, row-major here)', () => {
    for (const q of samples) {
      const columnMajor = glMat3.fromQuat(glMat3.create(), glq(q));
      expect(toMatrix3(q)).toBeNear(glMat3.transpose(glMat3.create(), columnMajor), { digits: 12 });
    }
  });
  it('row-major matrix times v equals rotate(q, v)', () => {
    const m = toMatrix3(qa);
    const v = [0.3, -1.2, 2];
    expect([m[0] * v[0] + m[1] * v[1] + m[2] * v[2], m[3] * v[0] + m[4] * v[1] + m[5] * v[2], m[6] * v[0] + m[7] * v[1] + m[8] * v[2]]).toBeNear(rotate(qa, v), { digits: 12 });
  });
});

describe('fromMatrix3', () => {
  it('matches gl-matrix quat.fromMat3 up to sign, across all four Shepperd branches', () => {
    for (const q of samples) {
      const rowMajor = toMatrix3(q);
      const columnMajor = glMat3.transpose(glMat3.create(), glMat3.fromValues(...(rowMajor as [number, number, number, number, number, number, number, number, number])));
      const ours = fromMatrix3(rowMajor);
      expect(ours[3]).toBeGreaterThanOrEqual(0);
      expect(equals(ours, glQuat.fromMat3(glQuat.create(), columnMajor), 1e-12)).toBe(true);
      expect(equals(ours, q, 1e-12)).toBe(true);
    }
  });
});

describe('slerp', () => {
  it('matches gl-matrix quat.slerp', () => {
    for (const t of [0, 0.2, 0.5, 0.9, 1]) expect(slerp(qa, qb, t)).toBeNear(glQuat.slerp(glQuat.create(), glq(qa), glq(qb), t), { digits: 12 });
  });
  it('takes the shorter arc when the quaternions have negative dot product', () => {
    const negB = qb.map((c) => -c);
    const mid = slerp(qa, negB, 0.5);
    expect(equals(mid, slerp(qa, qb, 0.5))).toBe(true);
  });
  it('handles nearly equal inputs', () => {
    const near = fromAxisAngle(axisA, 0.9 + 1e-12);
    expect(slerp(qa, near, 0.5)).toBeNear(qa, { digits: 12 });
  });
});

describe('fromSheet', () => {
  it('reorders {w, x, y, z} to [x, y, z, w]', () => expect(fromSheet({ w: 0.5, x: 0.5, y: -0.5, z: 0.5 })).toBeNear([0.5, -0.5, 0.5, 0.5], { digits: 15 }));
  it('normalises a slightly off-unit input', () => expect(fromSheet({ w: 2, x: 0, y: 0, z: 0 })).toBeNear([0, 0, 0, 1], { digits: 12 }));
});

describe('toSheet', () => {
  it('reorders [x, y, z, w] to {w, x, y, z}', () => expect(toSheet([1, 2, 3, 4])).toEqual({ w: 4, x: 1, y: 2, z: 3 }));
});

describe('equals', () => {
  it('counts q and -q as one rotation', () => expect(equals(qa, qa.map((c) => -c))).toBe(true));
  it('tells different rotations apart', () => expect(equals(qa, fromAxisAngle(axisA, 0.9 + 1e-6))).toBe(false));
});
