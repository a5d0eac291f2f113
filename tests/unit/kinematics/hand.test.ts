import { describe, expect, it } from 'vitest';
import { glMatrix, mat4, vec3 as glVec3 } from 'gl-matrix';
import { createFinger, forwardKinematics, jointExponential } from '../../../src/lib/kinematics/hand';
import type { FingerInput } from '../../../src/lib/sheet/types';

glMatrix.setMatrixArrayType(Array);

const l1 = 0.05, l2 = 0.035;
const planar: FingerInput = {
  name: 'planar',
  joints: [
    { name: 'q1', role: 'base', axis: [0, 0, 1], point: [0, 0, 0], angle: 0 },
    { name: 'q2', role: 'roll', axis: [0, 0, 1], point: [l1, 0, 0], angle: 0 },
  ],
  roller: { kind: 'sphere', radius: 0.01, center: [l1 + l2, 0, 0] },
};

describe('jointExponential', () => {
  it('matches gl-matrix: translate(r) rotate(w, theta) translate(-r) (Murray, Li & Sastry 1994, eq. 2.36)', () => {
    const axis = [2 / 7, 3 / 7, 6 / 7], point = [0.1, -0.2, 0.3], angle = 0.8;
    const R = new Float64Array(9), t = new Float64Array(3);
    jointExponential(axis, point, angle, R, t);
    const m = mat4.create();
    mat4.translate(m, m, glVec3.fromValues(point[0], point[1], point[2]));
    mat4.rotate(m, m, angle, glVec3.fromValues(axis[0], axis[1], axis[2]));
    mat4.translate(m, m, glVec3.fromValues(-point[0], -point[1], -point[2]));
    // gl-matrix mat4 is column-major: entry (row i, column j) is m[4 j + i].
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(R[3 * i + j]).toBeCloseTo(m[4 * j + i], 14);
    expect(t).toBeNear([m[12], m[13], m[14]], { digits: 14 });
  });
});

describe('forwardKinematics', () => {
  it('planar two-link finger: x = l1 cos q1 + l2 cos(q1 + q2), y = l1 sin q1 + l2 sin(q1 + q2) (Lynch & Park 2017, ch. 4, planar 2R)', () => {
    const finger = createFinger(planar);
    for (const [q1, q2] of [[0.3, 0.5], [-1.2, 2.1], [Math.PI / 2, -Math.PI / 2]]) {
      finger.angles[0] = q1;
      finger.angles[1] = q2;
      forwardKinematics(finger);
      expect(finger.rollerCenter).toBeNear([l1 * Math.cos(q1) + l2 * Math.cos(q1 + q2), l1 * Math.sin(q1) + l2 * Math.sin(q1 + q2), 0], { digits: 12 });
      // The second joint's point moves with the first link to (l1 cos q1, l1 sin q1).
      expect(finger.points.subarray(3, 6)).toBeNear([l1 * Math.cos(q1), l1 * Math.sin(q1), 0], { digits: 12 });
      expect(finger.axes.subarray(3, 6)).toBeNear([0, 0, 1], { digits: 12 });
    }
  });

  it('spatial three-joint chain matches the product of gl-matrix joint transforms (Murray, Li & Sastry 1994, eq. 3.3)', () => {
    const input: FingerInput = {
      name: 'spatial',
      joints: [
        { name: 'base', role: 'base', axis: [0, 1, 0], point: [0, 0, 0], angle: 0.4 },
        { name: 'pivot', role: 'pivot', axis: [0, 0, 1], point: [0.06, 0, 0], angle: -0.7 },
        { name: 'roll', role: 'roll', axis: [1, 0, 0], point: [0.06, 0, 0], angle: 1.3 },
      ],
      roller: { kind: 'cylinder', radius: 0.012, halfWidth: 0.008, center: [0.07, 0.01, 0.005], axis: [1, 0, 0] },
    };
    const finger = createFinger(input);
    const g = mat4.create();
    const expectedAxes: number[][] = [];
    const expectedPoints: number[][] = [];
    for (const joint of input.joints) {
      const a = glVec3.transformMat4(glVec3.create(), glVec3.fromValues(...joint.point), g);
      const w = glVec3.transformMat4(glVec3.create(), glVec3.fromValues(...joint.axis), g);
      glVec3.subtract(w, w, glVec3.transformMat4(glVec3.create(), glVec3.create(), g));
      expectedAxes.push([...w]);
      expectedPoints.push([...a]);
      const e = mat4.create();
      mat4.translate(e, e, glVec3.fromValues(...joint.point));
      mat4.rotate(e, e, joint.angle, glVec3.fromValues(...joint.axis));
      mat4.translate(e, e, glVec3.fromValues(-joint.point[0], -joint.point[1], -joint.point[2]));
      mat4.multiply(g, g, e);
    }
    for (let k = 0; k < 3; k++) {
      expect(finger.axes.subarray(3 * k, 3 * k + 3)).toBeNear(expectedAxes[k], { digits: 12 });
      const p = finger.points.subarray(3 * k, 3 * k + 3);
      // A point on the axis is defined up to sliding along it; compare the component off the axis.
      const d = [p[0] - expectedPoints[k][0], p[1] - expectedPoints[k][1], p[2] - expectedPoints[k][2]];
      const w = expectedAxes[k];
      const along = d[0] * w[0] + d[1] * w[1] + d[2] * w[2];
      expect(d.map((c, i) => c - along * w[i])).toBeNear([0, 0, 0], { digits: 12 });
    }
    expect(finger.rollerCenter).toBeNear([...glVec3.transformMat4(glVec3.create(), glVec3.fromValues(0.07, 0.01, 0.005), g)], { digits: 12 });
    const axis = glVec3.transformMat4(glVec3.create(), glVec3.fromValues(1, 0, 0), g);
    glVec3.subtract(axis, axis, glVec3.transformMat4(glVec3.create(), glVec3.create(), g));
    expect(finger.rollerAxis).toBeNear([...axis], { digits: 12 });
  });

  it('at the angles of its previous call keeps that call\'s results, and at new angles gives what a newly compiled finger gives (an independent second route)', () => {
    const input: FingerInput = {
      name: 'spatial',
      joints: [
        { name: 'base', role: 'base', axis: [0, 1, 0], point: [0, 0, 0], angle: 0.4 },
        { name: 'pivot', role: 'pivot', axis: [0, 0, 1], point: [0.06, 0, 0], angle: -0.7 },
        { name: 'roll', role: 'roll', axis: [1, 0, 0], point: [0.06, 0, 0], angle: 1.3 },
      ],
      roller: { kind: 'sphere', radius: 0.012, center: [0.07, 0.01, 0.005] },
    };
    const finger = createFinger(input);
    const computed = (f: ReturnType<typeof createFinger>) =>
      [f.axes, f.points, f.rollerCenter, f.rollerAxis, f.rollerRotation, f.chainTranslation].map((a) => Array.from(a));
    // Each posture twice in a row, then back to an earlier one: the repeat must not reuse a stale chain.
    for (const angles of [[0.4, -0.7, 1.3], [0.4, -0.7, 1.3], [0.4, -0.2, 1.3], [0.4, -0.2, -2], [0.4, -0.7, 1.3], [0, 0, 0]]) {
      finger.angles.set(angles);
      forwardKinematics(finger);
      const fresh = createFinger({ ...input, joints: input.joints.map((joint, k) => ({ ...joint, angle: angles[k] })) });
      expect(computed(finger)).toEqual(computed(fresh));
    }
  });

  it('records roles, limits and a sphere roller axis from the roll joint', () => {
    const finger = createFinger({ ...planar, joints: [{ ...planar.joints[0], limits: { min: -1, max: 1 }, rateLimit: 3 }, planar.joints[1]] });
    expect([finger.baseIndex, finger.pivotIndex, finger.rollIndex]).toEqual([0, -1, 1]);
    expect([finger.lowerLimits[0], finger.upperLimits[0], finger.rateLimits[0]]).toEqual([-1, 1, 3]);
    expect(finger.upperLimits[1]).toBe(Infinity);
    expect(finger.rollerAxis).toBeNear([0, 0, 1], { digits: 12 });
  });
});
