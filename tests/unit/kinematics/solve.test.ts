import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix as MlMatrix, SingularValueDecomposition, determinant, inverse } from 'ml-matrix';
import { computeContact, createObject } from '../../../src/lib/kinematics/contact';
import { createFinger } from '../../../src/lib/kinematics/hand';
import { createMatrix, matrixFromRows } from '../../../src/lib/kinematics/linalg';
import {
  contactJacobian, createFullSolution, createSolveWorkspace, createSteerAndRoll, jacobianSingularValues, solveFull,
  largestEigenvalue3, solveSteerAndRoll, symmetricEigen3, symmetricEigen3Packed,
} from '../../../src/lib/kinematics/solve';
import type { FingerInput, SheetDocument, SolverSettings } from '../../../src/lib/sheet/types';
import { threeFingerFinger } from './three-finger-sheet';

const settings: SolverSettings = { damping: 1e-4, singularRatio: 1e-3, axisDistance: 1e-3, minTangentialSpeed: 1e-5, contactTolerance: 2e-4, softFinger: false };

function ball(radius: number, linear: [number, number, number], angular: [number, number, number] = [0, 0, 0]) {
  const object: SheetDocument['object'] = { shape: { kind: 'sphere', radius }, pose: { position: [0, 0, 0], orientation: { w: 1, x: 0, y: 0, z: 0 } }, twist: { linear, angular } };
  return createObject(object);
}

function solveFinger(input: FingerInput, o: ReturnType<typeof ball>, s: SolverSettings = settings) {
  const finger = createFinger(input);
  const contact = computeContact(o, finger, s.contactTolerance);
  const ws = createSolveWorkspace(finger.jointCount);
  const full = solveFull(finger, contact, o.angularVelocity, s, createFullSolution(finger.jointCount), ws);
  const steer = solveSteerAndRoll(finger, contact, full, s, createSteerAndRoll(finger.jointCount), ws);
  return { finger, contact, full, steer };
}

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

describe('symmetricEigen3', () => {
  const cases = [
    [4, 1, 2, 0.5, -0.3, 0.8],
    [1e-3, 2e-3, 5e-4, 1e-4, 0, -2e-4],
    [2, 2, 2, 0, 0, 0],
    [1, 1, 3, 0, 0, 0],
    [1, 1, 1, 1, 1, 1],
    [0, 0, 0, 0, 0, 0],
  ];
  it('packed entries [a00, a11, a22, a01, a02, a12] give the same eigenvalues and vectors as ml-matrix', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const values = new Float64Array(3), vectors = new Float64Array(9);
      symmetricEigen3Packed([a00, a11, a22, a01, a02, a12], values, vectors);
      const reference = new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues.sort((x, y) => y - x);
      const scale = Math.max(1e-300, Math.abs(reference[0]), Math.abs(reference[2]));
      for (let i = 0; i < 3; i++) expect(Math.abs(values[i] - reference[i]) / scale).toBeLessThan(1e-14);
      // A v = lambda v for every column (definition of an eigenvector).
      const a = [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]];
      for (let c = 0; c < 3; c++) {
        for (let r = 0; r < 3; r++) {
          const av = a[r][0] * vectors[c] + a[r][1] * vectors[3 + c] + a[r][2] * vectors[6 + c];
          expect(Math.abs(av - values[c] * vectors[3 * r + c]) / scale).toBeLessThan(1e-13);
        }
      }
    }
  });

  it('eigenvalues match ml-matrix EigenvalueDecomposition, also when two coincide', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const ours = symmetricEigen3(a00, a11, a22, a01, a02, a12, new Float64Array(3));
      const reference = new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues.sort((x, y) => y - x);
      const scale = Math.max(1e-300, Math.abs(reference[0]));
      for (let i = 0; i < 3; i++) expect(Math.abs(ours[i] - reference[i]) / scale).toBeLessThan(1e-14);
    }
  });
  it('eigenvectors satisfy A v = lambda v with orthonormal columns', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const values = new Float64Array(3), vectors = new Float64Array(9);
      symmetricEigen3(a00, a11, a22, a01, a02, a12, values, vectors);
      const a = new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]);
      const v = new MlMatrix([0, 1, 2].map((r) => Array.from(vectors.subarray(3 * r, 3 * r + 3))));
      const residual = a.mmul(v).sub(v.mmul(MlMatrix.diag(Array.from(values))));
      expect(residual.norm()).toBeLessThan(1e-14 * Math.max(1, a.norm()));
      expect(v.transpose().mmul(v).sub(MlMatrix.eye(3)).norm()).toBeLessThan(1e-14);
    }
  });
});

describe('largestEigenvalue3', () => {
  it('matches ml-matrix EigenvalueDecomposition (to 1e-8 where the two largest coincide)', () => {
    const cases: [number[], number][] = [[[4, 1, 2, 0.5, -0.3, 0.8], 1e-14], [[1e-3, 2e-3, 5e-4, 1e-4, 0, -2e-4], 1e-14], [[3, 3, 1, 0, 0, 0], 1e-8], [[2, 2, 2, 0, 0, 0], 1e-14]];
    for (const [[a00, a11, a22, a01, a02, a12], tolerance] of cases) {
      const reference = Math.max(...new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues);
      expect(Math.abs(largestEigenvalue3(a00, a11, a22, a01, a02, a12) - reference) / reference).toBeLessThan(tolerance);
    }
  });
});

describe('jacobianSingularValues', () => {
  it('matches ml-matrix SVD, with product sqrt(det(J J^T)) (Yoshikawa 1985)', () => {
    const rows = [[0.05, 0.01, 0.003, -0.02], [0.002, 0.03, -0.012, 0.01], [0.06, 0.004, 0.02, 0.001]];
    const ours = new Float64Array(3);
    expect(jacobianSingularValues(matrixFromRows(rows), ours)).toBe(ours);
    const product = ours[0] * ours[1] * ours[2];
    const m = new MlMatrix(rows);
    const reference = new SingularValueDecomposition(m, { autoTranspose: true }).diagonal;
    expect(ours).toBeNear(reference, { digits: 14 });
    expect(product).toBeCloseTo(Math.sqrt(determinant(m.mmul(m.transpose()))), 16);
  });
  it('keeps the smallest singular value accurate near rank loss (ml-matrix SVD as reference)', () => {
    const rows = [[0.05, 0, 1e-9], [0, 0.012, 0], [0.06, 0, 0]];
    const ours = new Float64Array(3);
    jacobianSingularValues(matrixFromRows(rows), ours);
    const reference = new SingularValueDecomposition(new MlMatrix(rows), { autoTranspose: true }).diagonal;
    expect(ours[2] / reference[2]).toBeCloseTo(1, 10);
    expect(ours).toBeNear(reference, { digits: 14 });
  });
  it('takes the unrolled route for square 3 x 3 Jacobians and still matches ml-matrix SVD, including a 3 x 4 with the same first columns', () => {
    // Seeded pseudo-random entries (a linear congruential generator) so the check is repeatable; the 3 x 4 case uses the general route.
    let state = 12345;
    const next = () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648 - 0.5) * 0.1;
    for (let trial = 0; trial < 20; trial++) {
      const rows = Array.from({ length: 3 }, () => [next(), next(), next()]);
      const ours = jacobianSingularValues(matrixFromRows(rows), new Float64Array(3));
      expect(ours).toBeNear(new SingularValueDecomposition(new MlMatrix(rows), { autoTranspose: true }).diagonal, { digits: 14 });
      const wide = rows.map((row) => [...row, 0]);
      expect(jacobianSingularValues(matrixFromRows(wide), new Float64Array(3))).toBeNear(ours, { digits: 15 });
    }
  });
  it('pads with zeros when there are fewer than three joints', () => {
    const ours = new Float64Array(3);
    jacobianSingularValues(matrixFromRows([[3], [4], [0]]), ours);
    expect(ours).toBeNear([5, 0, 0], { digits: 12 });
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

describe('solveSteerAndRoll', () => {
  // Finger 0 of the test hand: normal n = x, base column (0.05, 0, 0.06), pivot along x through the
  // centre, roll about z through the centre, rho = 0.012. Worked by hand: base rate = n.v / n.j_b;
  // remainder u; roll direction d(delta) = (0, -rho cos delta, -rho sin delta) must be parallel to u.
  const v: [number, number, number] = [0.01, 0.02, 0.02];

  it('base rate n . v / n . (w_b x (y - r_b)), remainder, pivot angle atan(u_z / u_y) and roll rate -|u| / rho', () => {
    const { steer } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    expect(steer.available).toBe(true);
    expect(steer.normalGain).toBeCloseTo(0.05, 15);
    expect(steer.baseRate).toBeCloseTo(0.01 / 0.05, 14);
    expect(steer.remainder).toBeNear([0, 0.02, 0.02 - 0.2 * 0.06], { digits: 14 });
    expect(steer.pivotChange).toBeCloseTo(Math.atan2(0.008, 0.02), 12);
    expect(steer.rollDistance).toBeCloseTo(0.012, 14);
    // Wheel fact |v| = omega r (common practice): the roll rate times the distance to the roll axis is |u|.
    expect(steer.rollRate).toBeCloseTo(-Math.hypot(0.02, 0.008) / 0.012, 12);
    expect(steer.aligned).toBe(true);
    expect(steer.residualNorm).toBeLessThan(1e-15);
    expect(steer.rates).toBeNear([0.2, 0, steer.rollRate], { digits: 14 });
  });

  it('of the two pivot solutions takes the one nearer the current angle', () => {
    const input = threeFingerFinger(0);
    input.joints[1] = { ...input.joints[1], angle: 2.9 };
    const { steer } = solveFinger(input, ball(0.04, v));
    // Roll axis now (0, -sin 2.9, cos 2.9); the alternative alignment lies pi away.
    const target = Math.atan2(0.008, 0.02);
    const candidates = [target - 2.9, target + Math.PI - 2.9].map((d) => Math.atan2(Math.sin(d), Math.cos(d)));
    const nearest = Math.abs(candidates[0]) < Math.abs(candidates[1]) ? candidates[0] : candidates[1];
    expect(steer.pivotChange).toBeCloseTo(nearest, 12);
    expect(steer.pivotAngle).toBeCloseTo(2.9 + nearest, 12);
    expect(steer.residualNorm).toBeLessThan(1e-15);
  });

  it('conditioning before and after steering, and the difference from the full rates', () => {
    const { steer, full } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    expect(steer.conditionBefore).toBe(full.conditionNumber);
    expect(steer.singularValuesAfter[0]).toBeGreaterThan(0);
    const difference = [0, 1, 2].map((k) => steer.rates[k] - full.rates[k]);
    expect(steer.rateDifference).toBeNear(difference, { digits: 15 });
    expect(steer.rateDifferenceNorm).toBeCloseTo(Math.hypot(...difference), 15);
  });

  it('judges the drive columns after steering: base and the steered roll column, sigma_2 / sigma_1 as by ml-matrix SVD', () => {
    const { steer } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    // Pivot through the contact: its column is zero and steering acts by turning the roll direction.
    expect(steer.pivotDrives).toBe(false);
    expect(steer.driveColumnCount).toBe(2);
    // Worked by hand: base column (0.05, 0, 0.06); roll column after steering rho u / |u|, u = (0, 0.02, 0.008)
    // (its sign, set by the roll axis, changes no singular value).
    const u = Math.hypot(0.02, 0.008);
    const rollColumn = [0, (0.012 * 0.02) / u, (0.012 * 0.008) / u];
    const reference = new SingularValueDecomposition(new MlMatrix([[0.05, rollColumn[0]], [0, rollColumn[1]], [0.06, rollColumn[2]]])).diagonal;
    expect(steer.driveSingularValues[0]).toBeCloseTo(reference[0], 14);
    expect(steer.driveSingularValues[1]).toBeCloseTo(reference[1], 14);
    expect(steer.driveRatio).toBeCloseTo(reference[1] / reference[0], 12);
  });

  it('counts the pivot as a drive column when its axis misses the contact by axisDistance or more', () => {
    const input = threeFingerFinger(0);
    // Pivot axis moved 4 mm along z: the contact now lies 4 mm from it, so turning the pivot moves the contact.
    input.joints[1] = { ...input.joints[1], point: [0.052, 0, 0.004] };
    const { steer, contact } = solveFinger(input, ball(0.04, v));
    expect(contact.pivotAxisDistance).toBeCloseTo(0.004, 12);
    expect(steer.pivotDrives).toBe(true);
    expect(steer.driveColumnCount).toBe(3);
    const a = steer.jacobianAfter.data;
    const reference = new SingularValueDecomposition(new MlMatrix([[a[0], a[1], a[2]], [a[3], a[4], a[5]], [a[6], a[7], a[8]]])).diagonal;
    expect(steer.driveRatio).toBeCloseTo(reference[1] / reference[0], 12);
  });

  it('reports misalignment when the pivot cone misses the needed direction', () => {
    const input = threeFingerFinger(0);
    const tilt = 0.3;
    input.joints[1] = { ...input.joints[1], axis: [0, 0, 1] };
    input.joints[2] = { ...input.joints[2], axis: [0, Math.cos(tilt), Math.sin(tilt)] };
    const { steer } = solveFinger(input, ball(0.04, [0.01, 0.001, 0.02]));
    expect(steer.aligned).toBe(false);
    expect(steer.misalignment).toBeGreaterThan(0.1);
    expect(steer.residualNorm).toBeGreaterThan(1e-4);
  });

  it('is unavailable without a base, pivot and roll joint', () => {
    const input = threeFingerFinger(0);
    input.joints[1] = { ...input.joints[1], role: 'other' };
    const { steer } = solveFinger(input, ball(0.04, v));
    expect(steer.available).toBe(false);
    expect(steer.rates[2]).toBe(0);
  });
});
