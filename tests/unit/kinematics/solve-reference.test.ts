/**
 * The per-solve kernels against a plain reference path kept here, on a seeded set of hands and poses,
 * so that a faster kernel that changes the numbers fails: forward kinematics, the full Jacobian and
 * its damped least-squares rates and singular values, the steer-and-roll base rates, the Jacobian after
 * steering, the rates' residual after steering and the singular values after steering and of the
 * drive columns.
 *
 * References:
 * - Space-form product of exponentials and revolute Jacobian columns w x (y - r): Lynch & Park, Modern
 *   Robotics (2017), sec. 4.1 and 5.1 (section numbers from memory); rotations by gl-matrix 3.4.
 * - Damped least squares x = J^T (J J^T + l^2 I)^-1 v: Wampler 1986; Nakamura & Hanafusa 1986; the
 *   inverse by mathjs.
 * - Minimum-norm solution of one equation a . x = b: x = a b / |a|^2 (Moore-Penrose pseudo-inverse of a
 *   row, common practice).
 * - Singular values by ml-matrix's SVD (Golub-Kahan), accurate to a few eps sigma_max in absolute terms
 *   (Golub & Van Loan, Matrix Computations, sec. 8.6; from memory), so they are compared with an absolute
 *   tolerance on the scale of sigma_max.
 * - Turning the pivot by delta moves every later joint by the pivot's rigid rotation, which is the
 *   product of exponentials at the pivot angle plus delta (the same book, sec. 4.1): the Jacobian after
 *   steering is the full Jacobian of the finger posed at the steered pivot angle, taken at the same
 *   contact point.
 */
import fc from 'fast-check';
import { mat3, quat, vec3 } from 'gl-matrix';
import { add, identity, inv, matrix, multiply, transpose, type Matrix as MathMatrix } from 'mathjs';
import { SingularValueDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { solveSheet, type FingerResult } from '../../../src/lib/kinematics/index';
import { HAND_TEMPLATES, createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { FingerInput, SheetDocument } from '../../../src/lib/sheet/types';
import { component, shapeArbitrary, vector } from './seeded-sheets';

const v3 = (x = 0, y = 0, z = 0) => [x, y, z] as unknown as vec3;
const m3 = () => [1, 0, 0, 0, 1, 0, 0, 0, 1] as unknown as mat3;

/** Current joint axes and points of the finger at the given angles by the space-form product of exponentials (palm frame). */
function referencePose(finger: FingerInput, angles: ArrayLike<number>): { axes: vec3[]; points: vec3[] } {
  const rotation = m3();
  const translation = v3();
  const axes: vec3[] = [];
  const points: vec3[] = [];
  finger.joints.forEach((joint, k) => {
    const home = vec3.normalize(v3(), joint.axis as unknown as vec3);
    const axis = vec3.transformMat3(v3(), home, rotation);
    const point = vec3.add(v3(), vec3.transformMat3(v3(), joint.point as unknown as vec3, rotation), translation);
    axes.push(axis);
    points.push(point);
    const jointRotation = mat3.fromQuat(m3(), quat.setAxisAngle([0, 0, 0, 1] as unknown as quat, axis, angles[k]));
    const shift = vec3.subtract(v3(), point, vec3.transformMat3(v3(), point, jointRotation));
    mat3.multiply(rotation, jointRotation, rotation);
    vec3.add(translation, vec3.transformMat3(v3(), translation, jointRotation), shift);
  });
  return { axes, points };
}

/** Rows of the 3 x n Jacobian with columns w_k x (y - r_k) (m/rad). */
function referenceJacobian(pose: { axes: vec3[]; points: vec3[] }, y: ArrayLike<number>): number[][] {
  const columns = pose.axes.map((w, k) => vec3.cross(v3(), w, vec3.subtract(v3(), y as vec3, pose.points[k])));
  return [0, 1, 2].map((i) => columns.map((c) => c[i]));
}

function rowsOf(data: Float64Array, rows: number, cols: number): number[][] {
  return Array.from({ length: rows }, (_, i) => Array.from(data.subarray(i * cols, i * cols + cols)));
}

/** Singular values of a 3 x n matrix (rows), descending and padded to 3, by ml-matrix's SVD. */
function referenceSingularValues(rows: number[][]): number[] {
  const s = [...new SingularValueDecomposition(rows, { autoTranspose: true }).diagonal].sort((a, b) => b - a);
  while (s.length < 3) s.push(0);
  return s.slice(0, 3);
}

/** x = J^T (J J^T + l^2 I)^-1 b (rad/s). */
function referenceDampedRates(rows: number[][], b: number[], damping: number): number[] {
  const j = matrix(rows);
  const gram = add(multiply(j, transpose(j)), multiply(damping * damping, identity(rows.length))) as MathMatrix;
  return (multiply(transpose(j), multiply(inv(gram), matrix(b))) as MathMatrix).toArray() as number[];
}

const maxAbs = (values: ArrayLike<number>) => Array.from(values).reduce((m, x) => Math.max(m, Math.abs(x)), 0);

const ballTemplates = HAND_TEMPLATES.filter((t) => t.fingers.every((f) => f.roller.kind === 'sphere')).map((t) => t.id);

/** Ball-roller hands on any shape, with random twists, joint angles within 0.3 rad of the template's and point or soft contacts. */
const sheetArbitrary = fc
  .record({
    template: fc.constantFrom(...ballTemplates),
    shape: shapeArbitrary,
    linear: vector(0.02),
    angular: vector(0.6),
    angles: fc.array(component(0.3), { minLength: 15, maxLength: 15 }),
    softFinger: fc.boolean(),
  })
  .map(({ template, shape, linear, angular, angles, softFinger }) => {
    const doc = createSheetFromTemplate(template, shape);
    doc.object.twist = { linear, angular };
    let a = 0;
    for (const finger of doc.hand.fingers) for (const joint of finger.joints) joint.angle += angles[a++ % angles.length];
    doc.solver.softFinger = softFinger;
    return doc;
  });

/** 48 hands and poses, the same on every run. */
const CASES: SheetDocument[] = fc.sample(sheetArbitrary, { numRuns: 48, seed: 20261203 });

function checkFinger(doc: SheetDocument, i: number, f: FingerResult): void {
  const finger = doc.hand.fingers[i];
  const angles = finger.joints.map((j) => j.angle);
  const pose = referencePose(finger, angles);
  const n = finger.joints.length;
  const lengthScale = maxAbs(pose.points.flatMap((p) => Array.from(p))) + maxAbs(f.contact.rollerPoint);
  // Positions round at about eps of the palm-frame coordinates, through a few products (common practice).
  expect(f.jointAxes).toBeNear(pose.axes.flatMap((a) => Array.from(a)), { abs: 1e-14 });
  expect(f.jointPoints).toBeNear(pose.points.flatMap((p) => Array.from(p)), { abs: 1e-14 * lengthScale });

  const y = f.contact.rollerPoint;
  const jacobian = referenceJacobian(pose, y);
  const jacobianScale = maxAbs(jacobian.flat());
  expect(rowsOf(f.full.jacobian.data, 3, n).flat()).toBeNear(jacobian.flat(), { abs: 1e-13 * lengthScale });

  const rows = jacobian.map((row) => row.slice());
  const target = Array.from(f.contact.objectVelocity);
  if (doc.solver.softFinger) {
    const normal = f.contact.normal;
    rows.push(pose.axes.map((w) => w[0] * normal[0] + w[1] * normal[1] + w[2] * normal[2]));
    const omega = doc.object.twist.angular;
    target.push(normal[0] * omega[0] + normal[1] * omega[1] + normal[2] * omega[2]);
  }
  const rates = referenceDampedRates(rows, target, doc.solver.damping);
  // The damped Gram matrix has condition number up to (sigma_max / lambda)^2, about 1e6 here, so two routes
  // differ by about 1e6 eps relative to the largest rate (perturbation of a linear solve, common practice).
  expect(f.full.rates).toBeNear(rates, { abs: 1e-9 * maxAbs(rates) + 1e-15 });
  expect(f.full.singularValues).toBeNear(referenceSingularValues(jacobian), { abs: 1e-12 * jacobianScale });

  const steer = f.steer;
  if (!steer.available) return;
  // Base joints: the minimum-norm rates a (n . v) / |a|^2 with a_k = n . (w_k x (y - r_k)).
  const normal = f.contact.normal;
  const v = f.contact.objectVelocity;
  const baseJoints = finger.joints.flatMap((j, k) => (j.role === 'base' ? [k] : []));
  const gains = baseJoints.map((k) => normal[0] * jacobian[0][k] + normal[1] * jacobian[1][k] + normal[2] * jacobian[2][k]);
  const gainSquared = gains.reduce((s, a) => s + a * a, 0);
  const normalSpeed = normal[0] * v[0] + normal[1] * v[1] + normal[2] * v[2];
  const baseRates = gains.map((a) => (gainSquared > 0 ? (a * normalSpeed) / gainSquared : 0));
  expect(steer.normalGains).toBeNear(gains, { abs: 1e-13 * lengthScale });
  expect(steer.baseRates).toBeNear(baseRates, { abs: 1e-10 * maxAbs(baseRates) + 1e-15 });
  const remainder = [0, 1, 2].map((c) => v[c] - baseJoints.reduce((s, k, j) => s + baseRates[j] * jacobian[c][k], 0));
  expect(steer.remainder).toBeNear(remainder, { abs: 1e-12 * (maxAbs(v) + 1e-9) });

  // After steering: the finger posed at the steered pivot angle, at the same contact point.
  const pivot = finger.joints.findIndex((j) => j.role === 'pivot');
  const steeredAngles = angles.slice();
  steeredAngles[pivot] = steer.pivotAngle;
  const after = referenceJacobian(referencePose(finger, steeredAngles), y);
  expect(rowsOf(steer.jacobianAfter.data, 3, n).flat()).toBeNear(after.flat(), { abs: 1e-13 * lengthScale });
  const achieved = [0, 1, 2].map((c) => after[c].reduce((s, x, k) => s + x * steer.rates[k], 0));
  expect(steer.residual).toBeNear(achieved.map((a, c) => v[c] - a), { abs: 1e-12 * (maxAbs(v) + maxAbs(achieved) + 1e-9) });
  expect(steer.singularValuesAfter).toBeNear(referenceSingularValues(after), { abs: 1e-12 * maxAbs(after.flat()) });
  const drive = after.map((row) => row.filter((_, k) => k !== pivot || steer.pivotDrives));
  expect(steer.driveColumnCount).toBe(drive[0].length);
  expect(steer.driveSingularValues).toBeNear(referenceSingularValues(drive), { abs: 1e-12 * maxAbs(drive.flat()) });
}

describe('solveScene against the plain reference path (48 seeded hands and poses)', () => {
  it('agrees on the kinematics, the full solution and steer-and-roll of every finger', () => {
    let steered = 0;
    for (const doc of CASES) {
      const result = solveSheet(doc);
      result.fingers.forEach((f, i) => {
        checkFinger(doc, i, f);
        if (f.steer.available && f.steer.pivotChange !== 0) steered++;
      });
    }
    // The steered branch must not be vacuous: most fingers turn their pivot.
    expect(steered).toBeGreaterThan(CASES.length);
  });
});
