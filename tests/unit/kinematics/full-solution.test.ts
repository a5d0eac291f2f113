import { describe, expect, it } from 'vitest';
import { Matrix as MlMatrix, inverse } from 'ml-matrix';
import { createObject } from '../../../src/lib/kinematics/contact';
import { contactJacobian } from '../../../src/lib/kinematics/full-solution';
import { createMatrix } from '../../../src/lib/kinematics/linalg';
import type { FingerInput } from '../../../src/lib/sheet/types';
import { ball, settings, solveFinger } from './single-finger';
import { threeFingerFinger } from './three-finger-sheet';

describe('contactJacobian', () => {
  it('planar 2R tip: J = [[-l1 s1 - l2 s12, -l2 s12], [l1 c1 + l2 c12, l2 c12]] (Lynch & Park 2017, ch. 5, planar 2R Jacobian)', () => {
    const l1 = 0.05, l2 = 0.03, q1 = 0.4, q2 = 0.9;
    const axes = [0, 0, 1, 0, 0, 1];
    const points = [0, 0, 0, l1 * Math.cos(q1), l1 * Math.sin(q1), 0];
    const tip = [l1 * Math.cos(q1) + l2 * Math.cos(q1 + q2), l1 * Math.sin(q1) + l2 * Math.sin(q1 + q2), 0];
    const j = contactJacobian(axes, points, 2, tip, createMatrix(3, 2));
    expect(j.data).toBeNear([
      -l1 * Math.sin(q1) - l2 * Math.sin(q1 + q2), -l2 * Math.sin(q1 + q2),
      l1 * Math.cos(q1) + l2 * Math.cos(q1 + q2), l2 * Math.cos(q1 + q2),
      0, 0,
    ], { digits: 12 });
  });
});

describe('solveFull', () => {
  it('damped least squares equals J^T (J J^T + lambda^2 I)^-1 v (Wampler 1986; ml-matrix as reference)', () => {
    const input = threeFingerFinger(0);
    input.joints[1] = { ...input.joints[1], axis: [0, 0, 1], point: [0.052, 0.01, 0] };
    const { full } = solveFinger(input, ball(0.04, [0.01, 0.005, 0.02], [0.1, 0, 0.5]), { ...settings, damping: 0.003 });
    const j = new MlMatrix([0, 1, 2].map((i) => Array.from(full.jacobian.data.subarray(3 * i, 3 * i + 3))));
    const lambda2 = MlMatrix.eye(3).mul(0.003 * 0.003);
    const expected = j.transpose().mmul(inverse(j.mmul(j.transpose()).add(lambda2))).mmul(MlMatrix.columnVector(Array.from(full.target.subarray(0, 3))));
    expect(full.rates).toBeNear(expected.to1DArray(), { digits: 12 });
    expect(full.residual.subarray(0, 3)).toBeNear([0, 1, 2].map((i) => full.target[i] - full.achieved[i]), { digits: 15 });
  });

  it('ball on a treadmill: roller with x and y roll axes rolls at omega_x = v_y / rho, omega_y = -v_x / rho (Montana 1988; Murray, Li & Sastry 1994, ch. 5, sphere on a plane; values from memory)', () => {
    const rho = 0.01;
    const input: FingerInput = {
      name: 'ball wheel',
      joints: [
        { name: 'x', role: 'roll', axis: [1, 0, 0], point: [0, 0, rho], angle: 0 },
        { name: 'y', role: 'other', axis: [0, 1, 0], point: [0, 0, rho], angle: 0 },
      ],
      roller: { kind: 'sphere', radius: rho, center: [0, 0, rho] },
    };
    const floor = createObject({ shape: { kind: 'box', halfExtents: [1, 1, 0.1], filletRadius: 0 }, pose: { position: [0, 0, -0.1], orientation: { w: 1, x: 0, y: 0, z: 0 } }, twist: { linear: [0.03, -0.02, 0], angular: [0, 0, 0] } });
    const { full, contact } = solveFinger(input, floor, { ...settings, damping: 0 });
    expect(contact.gap).toBeCloseTo(0, 15);
    expect(full.rates).toBeNear([-0.02 / rho, -0.03 / rho], { digits: 12 });
    expect(full.residualNorm).toBeLessThan(1e-15);
    // Rolling without slipping: |v| = omega r for the resulting roller spin (common practice).
    expect(Math.hypot(full.rates[0], full.rates[1]) * rho).toBeCloseTo(Math.hypot(0.03, 0.02), 14);
  });

  it('soft finger adds the row n . w_k with target n . omega_object', () => {
    const { full, contact } = solveFinger(threeFingerFinger(0), ball(0.04, [0, 0, 0], [0.3, 0, 0]), { ...settings, softFinger: true });
    expect(full.rows).toBe(4);
    expect(full.jacobian.data.subarray(9, 12)).toBeNear([contact.normal[0] * 0 + contact.normal[1] * 1 + contact.normal[2] * 0, 1, 0], { digits: 12 });
    expect(full.target[3]).toBeCloseTo(0.3, 15);
    // The pivot (along the normal) spins the roller with the object.
    expect(full.rates[1]).toBeCloseTo(0.3, 6);
  });

  it('reports singular values, condition number and manipulability of the translational Jacobian', () => {
    const { full } = solveFinger(threeFingerFinger(0), ball(0.04, [0.01, 0, 0.02]));
    // Pivot along the contact normal: its column w x (y - r) vanishes, so the rank drops to 2.
    expect(full.singularValues[2]).toBe(0);
    expect(full.conditionNumber).toBe(Infinity);
    expect(full.manipulability).toBe(0);
    expect(full.singularRatio).toBe(0);
  });
});
