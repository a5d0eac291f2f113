/**
 * Full solution of the joint rates for rolling without slipping at one contact (world frame, SI):
 * the roller's material point at y must move with the object, so
 * sum_k theta_dot_k w_k x (y - r_k) = v_o(x) (revolute joint columns, Murray, Li & Sastry 1994,
 * ch. 3, sec. 4), solved by damped least squares (Wampler 1986; Nakamura & Hanafusa 1986).
 */
import type { SolverSettings } from '../sheet/types';
import type { Contact } from './contact';
import { jacobianSingularValues } from './eigen3';
import type { Finger } from './hand';
import {
  conditionNumber, createLinalgWorkspace, createMatrix, dampedLeastSquares, numericalRank,
  type LinalgWorkspace, type Matrix,
} from './linalg';

/** Damped least-squares solution of J theta_dot = v_o(x) for one finger. */
export interface FullSolution {
  /** Rows of the solved system: 3 (point contact) or 4 (soft finger, last row n . omega). */
  rows: number;
  /** Contact Jacobian, rows x joints, row-major: columns w_k x (y - r_k) in m/rad, soft-finger row n . w_k. */
  jacobian: Matrix;
  /** Right-hand side: v_o(x) in m/s, then n . omega_object in rad/s for a soft finger. */
  target: Float64Array;
  /** Joint rates, rad/s. */
  rates: Float64Array;
  /** J theta_dot, same units as target. */
  achieved: Float64Array;
  /** target - achieved: the slip the joints cannot remove. */
  residual: Float64Array;
  /** Norm of the translational residual, m/s. */
  residualNorm: number;
  /** Soft-finger spin residual, rad/s (0 for point contact). */
  spinResidual: number;
  /** Singular values of the 3 x n translational Jacobian, descending, m/rad (missing ones are 0; see jacobianSingularValues). */
  singularValues: Float64Array;
  /** Singular values above rankTolerance: the numerical rank of the translational Jacobian, 0 to 3 (full rank 3). */
  rank: number;
  /** Rank tolerance of this finger's Jacobians at the current posture (m/rad; see contactRankTolerance). */
  rankTolerance: number;
  /** sigma_min / sigma_max of the translational Jacobian (dimensionless; 0 when rank is below 3). */
  singularRatio: number;
  /** sigma_max / sigma_min (dimensionless; Infinity when rank is below 3). */
  conditionNumber: number;
  /** Yoshikawa manipulability sqrt(det(J J^T)) of the translational Jacobian (Yoshikawa 1985), m^3/rad^3. */
  manipulability: number;
}

/** New scratch for solveFull on fingers of up to maxJoints joints (up to 4 rows with the soft-finger row). */
export function createFullSolveWorkspace(maxJoints: number): LinalgWorkspace {
  return createLinalgWorkspace(4, Math.max(4, maxJoints));
}

/** Empty full solution for a finger of n joints. */
export function createFullSolution(jointCount: number): FullSolution {
  return {
    rows: 3,
    jacobian: createMatrix(4, jointCount),
    target: new Float64Array(4),
    rates: new Float64Array(jointCount),
    achieved: new Float64Array(4),
    residual: new Float64Array(4),
    residualNorm: 0,
    spinResidual: 0,
    singularValues: new Float64Array(3),
    rank: 0,
    rankTolerance: 0,
    singularRatio: 0,
    conditionNumber: Number.POSITIVE_INFINITY,
    manipulability: 0,
  };
}

/**
 * Writes the 3 x n contact Jacobian with columns w_k x (y - r_k) into out (m/rad), from axes
 * and points packed 3 per joint (world frame); out.data is row-major with out.cols = n.
 */
export function contactJacobian(axes: ArrayLike<number>, points: ArrayLike<number>, jointCount: number, y: ArrayLike<number>, out: Matrix): Matrix {
  const n = jointCount, d = out.data;
  out.rows = 3;
  out.cols = n;
  for (let k = 0, o = 0; k < n; k++, o += 3) {
    const wx = axes[o], wy = axes[o + 1], wz = axes[o + 2];
    const ex = y[0] - points[o], ey = y[1] - points[o + 1], ez = y[2] - points[o + 2];
    d[k] = wy * ez - wz * ey;
    d[n + k] = wz * ex - wx * ez;
    d[2 * n + k] = wx * ey - wy * ex;
  }
  return out;
}

/**
 * Numerical-rank tolerance of a contact Jacobian with columns w_k x (y - r_k) (m/rad): max(rows, cols) eps
 * times sum_k (|y|_1 + |r_k|_1), for points r_k packed 3 per joint and y in the palm frame (m). The usual
 * max(rows, cols) eps sigma_max (Golub & Van Loan, "Matrix Computations", sec. 5.4.1) assumes entries exact
 * to rounding of their own size; these entries come from forward kinematics and y - r_k, which round at the
 * size of the positions, not of the lever arm, so a finger far from the palm origin with short lever arms
 * leaves a sigma_min of rank loss far above eps sigma_max. The perturbation of the entries is at most of this
 * size, so by Weyl's inequality it bounds what rounding adds to a zero singular value; the sum of positions
 * is at least ||J||_F >= sigma_max, so the usual tolerance is never larger.
 */
export function contactRankTolerance(points: ArrayLike<number>, jointCount: number, y: ArrayLike<number>, rows: number): number {
  const yScale = Math.abs(y[0]) + Math.abs(y[1]) + Math.abs(y[2]);
  let scale = 0;
  for (let o = 0, end = 3 * jointCount; o < end; o += 3) scale += yScale + Math.abs(points[o]) + Math.abs(points[o + 1]) + Math.abs(points[o + 2]);
  return (rows > jointCount ? rows : jointCount) * Number.EPSILON * scale;
}

/** Full damped least-squares solution for one finger after its contact is computed, with the conditioning of its Jacobian (world frame, SI). */
export function solveFull(finger: Finger, contact: Contact, angularVelocity: ArrayLike<number>, settings: SolverSettings, out: FullSolution, ws: LinalgWorkspace): FullSolution {
  solveFullRates(finger, contact, angularVelocity, settings, out, ws);
  return conditionFull(out);
}

/** The Jacobian, rates, achieved velocity, residual and rank tolerance of solveFull without the conditioning (world frame, SI). */
export function solveFullRates(finger: Finger, contact: Contact, angularVelocity: ArrayLike<number>, settings: SolverSettings, out: FullSolution, ws: LinalgWorkspace): FullSolution {
  const n = finger.jointCount;
  const j = out.jacobian;
  contactJacobian(finger.axes, finger.points, n, contact.rollerPoint, j);
  const target = out.target, v = contact.objectVelocity, nrm = contact.normal;
  target[0] = v[0]; target[1] = v[1]; target[2] = v[2];
  let rows = 3;
  if (settings.softFinger) {
    // No spin about the normal: n . (sum_k w_k theta_dot_k) = n . omega_object.
    rows = 4;
    const d = j.data, axes = finger.axes;
    for (let k = 0; k < n; k++) d[3 * n + k] = nrm[0] * axes[3 * k] + nrm[1] * axes[3 * k + 1] + nrm[2] * axes[3 * k + 2];
    target[3] = nrm[0] * angularVelocity[0] + nrm[1] * angularVelocity[1] + nrm[2] * angularVelocity[2];
  } else {
    target[3] = 0;
  }
  j.rows = rows;
  out.rows = rows;
  dampedLeastSquares(j, target, settings.damping, out.rates, ws);
  const d = j.data, rates = out.rates, achieved = out.achieved, residual = out.residual;
  let translational = 0;
  for (let i = 0; i < 3; i++) {
    let sum = 0;
    for (let k = 0, o = i * n; k < n; k++) sum += d[o + k] * rates[k];
    achieved[i] = sum;
    residual[i] = target[i] - sum;
    translational += residual[i] * residual[i];
  }
  let spin = 0;
  if (rows === 4) for (let k = 0; k < n; k++) spin += d[3 * n + k] * rates[k];
  achieved[3] = spin;
  residual[3] = rows === 4 ? target[3] - spin : 0;
  out.residualNorm = Math.sqrt(translational);
  out.spinResidual = rows === 4 ? Math.abs(out.residual[3]) : 0;
  // Here rather than in conditionFull: the drive columns after steering are judged with it also where runs skip conditionFull.
  out.rankTolerance = contactRankTolerance(finger.points, n, contact.rollerPoint, 3);
  return out;
}

/** Singular values, rank, ratio, condition number and manipulability of the translational Jacobian that solveFullRates wrote into out, judged with its rank tolerance. */
export function conditionFull(out: FullSolution): FullSolution {
  const j = out.jacobian, rows = j.rows;
  j.rows = 3;
  const s = jacobianSingularValues(j, out.singularValues);
  const tolerance = out.rankTolerance;
  out.manipulability = s[0] * s[1] * s[2];
  out.rank = numericalRank(s, 3, tolerance);
  out.conditionNumber = conditionNumber(s, 3, tolerance);
  out.singularRatio = out.rank === 3 ? s[2] / s[0] : 0;
  j.rows = rows;
  return out;
}
