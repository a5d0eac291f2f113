/**
 * Joint rates for rolling without slipping at one contact (world frame, SI).
 * Full solution: the roller's material point at y must move with the object, so
 * sum_k theta_dot_k w_k x (y - r_k) = v_o(x) (revolute joint columns, Murray, Li & Sastry 1994,
 * ch. 3, sec. 4), solved by damped least squares (Wampler 1986; Nakamura & Hanafusa 1986).
 * Steer-and-roll solution: the base supplies the normal velocity, the pivot turns the roll
 * direction onto what is left, and the roll joint supplies its magnitude.
 */
import type { SolverSettings } from '../sheet/types';
import type { Contact } from './contact';
import type { Finger } from './hand';
import {
  conditionNumber, createLinalgWorkspace, createMatrix, dampedLeastSquares,
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
  /** sigma_min / sigma_max of the translational Jacobian (dimensionless; 0 at rank loss). */
  singularRatio: number;
  /** sigma_max / sigma_min (dimensionless; Infinity at rank loss). */
  conditionNumber: number;
  /** Yoshikawa manipulability sqrt(det(J J^T)) of the translational Jacobian (Yoshikawa 1985), m^3/rad^3. */
  manipulability: number;
}

/** Steer-and-roll solution for one finger (world frame, SI). */
export interface SteerAndRoll {
  /** The finger has a base, a pivot and a roll joint. */
  available: boolean;
  /** n . (w_base x (y - r_base)): normal contact speed per unit base rate, m/rad. */
  normalGain: number;
  /** Base rate n . v_o / normalGain, rad/s (0 when the gain vanishes). */
  baseRate: number;
  /** v_o(x) - baseRate (w_base x (y - r_base)), m/s: what the roller must supply. */
  remainder: Float64Array;
  remainderNorm: number;
  /** Pivot change from the current angle and the steered pivot angle, rad. */
  pivotChange: number;
  pivotAngle: number;
  /** The roll direction could be aligned exactly with the remainder. */
  aligned: boolean;
  /** Angle between the steered roll direction and the remainder's line, rad (0 when aligned). */
  misalignment: number;
  /** Distance from the contact to the roll axis after steering, m. */
  rollDistance: number;
  /** Roll rate remainder . d / |d|^2 with d = w_roll x (y - r_roll) after steering, rad/s (= +-|remainder| / rollDistance when aligned). */
  rollRate: number;
  /** Joint rates: base and roll set, every other joint 0, rad/s. */
  rates: Float64Array;
  /** Translational Jacobian after steering (3 x joints, m/rad). */
  jacobianAfter: Matrix;
  /** J_after rates, m/s; residual v_o(x) - achieved and its norm. */
  achieved: Float64Array;
  residual: Float64Array;
  residualNorm: number;
  /** Condition numbers before and after steering, and the singular values after (m/rad). */
  conditionBefore: number;
  conditionAfter: number;
  singularValuesAfter: Float64Array;
  /**
   * The pivot column counts as a drive column: its axis passes the contact at axisDistance or more, so
   * turning it moves the contact. Otherwise steering acts only by turning the roll direction.
   */
  pivotDrives: boolean;
  /** Number of drive columns: every joint after steering except a pivot that does not drive. */
  driveColumnCount: number;
  /** Singular values of the 3 x driveColumnCount drive Jacobian after steering, descending, zero-padded (m/rad). */
  driveSingularValues: Float64Array;
  /**
   * sigma_2 / sigma_1 of the drive columns (1 with a single column; dimensionless, 0 at rank loss): they must
   * span the normal and the steered roll direction; steering itself supplies the third direction.
   */
  driveRatio: number;
  /** rates - full solution rates, rad/s, and its norm. */
  rateDifference: Float64Array;
  rateDifferenceNorm: number;
}

/** Scratch shared by the per-finger solves of one scene. */
export interface SolveWorkspace {
  linalg: LinalgWorkspace;
  /** D0, D1, D2 of the roll direction d(delta) = D0 + D1 cos delta + D2 sin delta, then cos and sin of the chosen delta. */
  steer: Float64Array;
  /** Drive columns of the steered Jacobian (3 x up to maxJoints). */
  drive: Matrix;
}

/** New solve scratch for fingers of up to maxJoints joints. */
export function createSolveWorkspace(maxJoints: number): SolveWorkspace {
  return {
    linalg: createLinalgWorkspace(4, Math.max(4, maxJoints)),
    steer: new Float64Array(11),
    drive: createMatrix(3, Math.max(1, maxJoints)),
  };
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
    singularRatio: 0,
    conditionNumber: Number.POSITIVE_INFINITY,
    manipulability: 0,
  };
}

/** Empty steer-and-roll solution for a finger of n joints. */
export function createSteerAndRoll(jointCount: number): SteerAndRoll {
  return {
    available: false,
    normalGain: 0,
    baseRate: 0,
    remainder: new Float64Array(3),
    remainderNorm: 0,
    pivotChange: 0,
    pivotAngle: 0,
    aligned: false,
    misalignment: 0,
    rollDistance: 0,
    rollRate: 0,
    rates: new Float64Array(jointCount),
    jacobianAfter: createMatrix(3, jointCount),
    achieved: new Float64Array(3),
    residual: new Float64Array(3),
    residualNorm: 0,
    conditionBefore: Number.POSITIVE_INFINITY,
    conditionAfter: Number.POSITIVE_INFINITY,
    singularValuesAfter: new Float64Array(3),
    pivotDrives: false,
    driveColumnCount: 0,
    driveSingularValues: new Float64Array(3),
    driveRatio: 0,
    rateDifference: new Float64Array(jointCount),
    rateDifferenceNorm: 0,
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

const JACOBI_SWEEPS = 16;
const NEGLIGIBLE = 1e-16;

/**
 * Eigenvalues (descending, into values) and optionally unit eigenvectors (columns of the
 * row-major 3 x 3 vectors) of the symmetric matrix [[a00, a01, a02], [a01, a11, a12],
 * [a02, a12, a22]] by cyclic Jacobi rotations (Golub & Van Loan, "Matrix Computations", 4th ed.,
 * sec. 8.5.2-8.5.3), which keep every eigenvalue accurate to rounding relative to the largest,
 * also when two coincide; units of the entries.
 */
export function symmetricEigen3(a00: number, a11: number, a22: number, a01: number, a02: number, a12: number, values: Float64Array, vectors: Float64Array | null = null): Float64Array {
  const e = packedEntries;
  e[0] = a00; e[1] = a11; e[2] = a22; e[3] = a01; e[4] = a02; e[5] = a12;
  return symmetricEigen3Packed(e, values, vectors);
}

const packedEntries = new Float64Array(6);

/**
 * symmetricEigen3 with the entries packed as [a00, a11, a22, a01, a02, a12] (units of the entries):
 * arrays cross the call unboxed, where six computed numbers passed to a function too large to
 * inline would each be boxed on the heap.
 */
export function symmetricEigen3Packed(entries: ArrayLike<number>, values: Float64Array, vectors: Float64Array | null = null): Float64Array {
  let a00 = entries[0], a11 = entries[1], a22 = entries[2], a01 = entries[3], a02 = entries[4], a12 = entries[5];
  let v00 = 1, v01 = 0, v02 = 0, v10 = 0, v11 = 1, v12 = 0, v20 = 0, v21 = 0, v22 = 1;
  for (let sweep = 0; sweep < JACOBI_SWEEPS; sweep++) {
    // Off-diagonal entries at rounding level of the matrix scale shift the eigenvalues by less than rounding.
    const limit = NEGLIGIBLE * (Math.abs(a00) + Math.abs(a11) + Math.abs(a22) + Math.abs(a01) + Math.abs(a02) + Math.abs(a12));
    const skip01 = Math.abs(a01) <= limit;
    if (skip01 && Math.abs(a02) <= limit && Math.abs(a12) <= limit) break;
    // Each rotation zeroes one off-diagonal pair (p, q); c, s from Rutishauser's stable formulas.
    if (!skip01) {
      const theta = (a11 - a00) / (2 * a01);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a00 -= t * a01; a11 += t * a01; a01 = 0;
      const x = a02, y = a12;
      a02 = c * x - s * y; a12 = s * x + c * y;
      let p = v00, q = v01; v00 = c * p - s * q; v01 = s * p + c * q;
      p = v10; q = v11; v10 = c * p - s * q; v11 = s * p + c * q;
      p = v20; q = v21; v20 = c * p - s * q; v21 = s * p + c * q;
    }
    if (Math.abs(a02) > limit) {
      const theta = (a22 - a00) / (2 * a02);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a00 -= t * a02; a22 += t * a02; a02 = 0;
      const x = a01, y = a12;
      a01 = c * x - s * y; a12 = s * x + c * y;
      let p = v00, q = v02; v00 = c * p - s * q; v02 = s * p + c * q;
      p = v10; q = v12; v10 = c * p - s * q; v12 = s * p + c * q;
      p = v20; q = v22; v20 = c * p - s * q; v22 = s * p + c * q;
    }
    if (Math.abs(a12) > limit) {
      const theta = (a22 - a11) / (2 * a12);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a11 -= t * a12; a22 += t * a12; a12 = 0;
      const x = a01, y = a02;
      a01 = c * x - s * y; a02 = s * x + c * y;
      let p = v01, q = v02; v01 = c * p - s * q; v02 = s * p + c * q;
      p = v11; q = v12; v11 = c * p - s * q; v12 = s * p + c * q;
      p = v21; q = v22; v21 = c * p - s * q; v22 = s * p + c * q;
    }
  }
  values[0] = a00; values[1] = a11; values[2] = a22;
  if (vectors !== null) {
    vectors[0] = v00; vectors[1] = v01; vectors[2] = v02;
    vectors[3] = v10; vectors[4] = v11; vectors[5] = v12;
    vectors[6] = v20; vectors[7] = v21; vectors[8] = v22;
  }
  // Sorting network on three entries, moving eigenvector columns along.
  if (values[0] < values[1]) swapPair(values, vectors, 0, 1);
  if (values[1] < values[2]) swapPair(values, vectors, 1, 2);
  if (values[0] < values[1]) swapPair(values, vectors, 0, 1);
  return values;
}

function swapPair(values: Float64Array, vectors: Float64Array | null, i: number, k: number): void {
  const t = values[i];
  values[i] = values[k];
  values[k] = t;
  if (vectors === null) return;
  for (let row = 0; row < 9; row += 3) {
    const x = vectors[row + i];
    vectors[row + i] = vectors[row + k];
    vectors[row + k] = x;
  }
}

/**
 * Largest eigenvalue of the symmetric 3 x 3 matrix [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]
 * by the trigonometric closed form (Smith 1961, "Eigenvalues of a 3x3 real symmetric matrix",
 * Comm. ACM 4(4), p. 168): accurate to rounding unless the two largest eigenvalues nearly
 * coincide, where the relative error grows to about 1e-8 (units of the entries).
 */
export function largestEigenvalue3(a00: number, a11: number, a22: number, a01: number, a02: number, a12: number): number {
  const p1 = a01 * a01 + a02 * a02 + a12 * a12;
  const q = (a00 + a11 + a22) / 3;
  const b00 = a00 - q, b11 = a11 - q, b22 = a22 - q;
  const p2 = b00 * b00 + b11 * b11 + b22 * b22 + 2 * p1;
  if (p2 === 0) return q;
  const p = Math.sqrt(p2 / 6);
  const det = b00 * (b11 * b22 - a12 * a12) - a01 * (a01 * b22 - a12 * a02) + a02 * (a01 * a12 - b11 * a02);
  let r = det / (2 * p * p * p);
  r = r < -1 ? -1 : r > 1 ? 1 : r;
  return q + 2 * p * Math.cos(Math.acos(r) / 3);
}

/**
 * Singular values of a 3 x n Jacobian, descending and padded with zeros, into out (returned; their
 * product is sqrt(det(J J^T))). The largest comes from the largest eigenvalue of J J^T. The other two come from
 * sums of squared minors of J itself (Cauchy-Binet): E2 = sum of squared 2 x 2 minors
 * = s1^2 s2^2 + s1^2 s3^2 + s2^2 s3^2 and P = sqrt(sum of squared 3 x 3 minors) = s1 s2 s3, so
 * s2^2 and s3^2 are the roots of t^2 - (E2 - P^2 / s1^2) / s1^2 t + P^2 / s1^2; this keeps small
 * singular values accurate relative to themselves, where sqrt of a small eigenvalue of J J^T
 * would lose half the digits.
 */
export function jacobianSingularValues(j: Matrix, out: Float64Array): Float64Array {
  const n = j.cols, d = j.data;
  let g00: number, g11: number, g22: number, g01: number, g02: number, g12: number;
  let e2 = 0, e3 = 0;
  if (n === 3) {
    // The usual finger, unrolled (about 4 % of a whole three-finger solve by npm run bench): with rows a, b, c the 2 x 2 minors
    // are the entries of a x b, a x c and b x c, and the 3 x 3 minor is a . (b x c).
    const ax = d[0], ay = d[1], az = d[2], bx = d[3], by = d[4], bz = d[5], cx = d[6], cy = d[7], cz = d[8];
    g00 = ax * ax + ay * ay + az * az; g11 = bx * bx + by * by + bz * bz; g22 = cx * cx + cy * cy + cz * cz;
    g01 = ax * bx + ay * by + az * bz; g02 = ax * cx + ay * cy + az * cz; g12 = bx * cx + by * cy + bz * cz;
    const abx = ay * bz - az * by, aby = az * bx - ax * bz, abz = ax * by - ay * bx;
    const acx = ay * cz - az * cy, acy = az * cx - ax * cz, acz = ax * cy - ay * cx;
    const bcx = by * cz - bz * cy, bcy = bz * cx - bx * cz, bcz = bx * cy - by * cx;
    e2 = abx * abx + aby * aby + abz * abz + acx * acx + acy * acy + acz * acz + bcx * bcx + bcy * bcy + bcz * bcz;
    const det = ax * bcx + ay * bcy + az * bcz;
    e3 = det * det;
  } else {
    g00 = 0; g11 = 0; g22 = 0; g01 = 0; g02 = 0; g12 = 0;
    for (let k = 0; k < n; k++) {
      const x = d[k], y = d[n + k], z = d[2 * n + k];
      g00 += x * x; g11 += y * y; g22 += z * z;
      g01 += x * y; g02 += x * z; g12 += y * z;
    }
    for (let a = 0; a < n; a++) {
      for (let b = a + 1; b < n; b++) {
        const m01 = d[a] * d[n + b] - d[b] * d[n + a];
        const m02 = d[a] * d[2 * n + b] - d[b] * d[2 * n + a];
        const m12 = d[n + a] * d[2 * n + b] - d[n + b] * d[2 * n + a];
        e2 += m01 * m01 + m02 * m02 + m12 * m12;
        for (let c = b + 1; c < n; c++) {
          const m = d[c] * m12 - d[n + c] * m02 + d[2 * n + c] * m01;
          e3 += m * m;
        }
      }
    }
  }
  const largest = largestEigenvalue3(g00, g11, g22, g01, g02, g12);
  const s1Squared = largest > 0 ? largest : 0;
  out[0] = Math.sqrt(s1Squared);
  if (s1Squared === 0) {
    out[1] = 0;
    out[2] = 0;
    return out;
  }
  // One reciprocal rather than two dependent divisions: this chain of roots and quotients sets the cost of the call.
  const inverse = 1 / s1Squared;
  const product = e3 * inverse;
  const sum = Math.max(0, (e2 - product) * inverse);
  const discriminant = Math.max(0, sum * sum - 4 * product);
  const larger = 0.5 * (sum + Math.sqrt(discriminant));
  out[1] = Math.sqrt(larger);
  out[2] = larger > 0 ? Math.sqrt(product / larger) : 0;
  return out;
}

/** Full damped least-squares solution for one finger after its contact is computed (world frame, SI). */
export function solveFull(finger: Finger, contact: Contact, angularVelocity: ArrayLike<number>, settings: SolverSettings, out: FullSolution, ws: SolveWorkspace): FullSolution {
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
  dampedLeastSquares(j, target, settings.damping, out.rates, ws.linalg);
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
  j.rows = 3;
  const s = jacobianSingularValues(j, out.singularValues);
  out.manipulability = s[0] * s[1] * s[2];
  out.conditionNumber = conditionNumber(s, 3);
  out.singularRatio = s[0] > 0 ? s[2] / s[0] : 0;
  j.rows = rows;
  return out;
}

/** Steer-and-roll solution for one finger after solveFull, with the conditioning of its drive columns after steering (world frame, SI). */
export function solveSteerAndRoll(finger: Finger, contact: Contact, full: FullSolution, settings: SolverSettings, out: SteerAndRoll, ws: SolveWorkspace): SteerAndRoll {
  const n = finger.jointCount;
  const b = finger.baseIndex, pv = finger.pivotIndex, rl = finger.rollIndex;
  const rates = out.rates;
  for (let k = 0; k < n; k++) rates[k] = 0;
  out.conditionBefore = full.conditionNumber;
  out.available = b >= 0 && pv >= 0 && rl >= 0;
  const axes = finger.axes, points = finger.points;
  const y = contact.rollerPoint, nrm = contact.normal, v = contact.objectVelocity;
  const u = out.remainder;

  // Base: its column's normal component must produce the normal part of the contact velocity.
  let jbx = 0, jby = 0, jbz = 0;
  if (b >= 0) {
    const o = 3 * b;
    const ex = y[0] - points[o], ey = y[1] - points[o + 1], ez = y[2] - points[o + 2];
    jbx = axes[o + 1] * ez - axes[o + 2] * ey;
    jby = axes[o + 2] * ex - axes[o] * ez;
    jbz = axes[o] * ey - axes[o + 1] * ex;
  }
  const gain = nrm[0] * jbx + nrm[1] * jby + nrm[2] * jbz;
  const normalSpeed = nrm[0] * v[0] + nrm[1] * v[1] + nrm[2] * v[2];
  const baseRate = gain !== 0 && Number.isFinite(normalSpeed / gain) ? normalSpeed / gain : 0;
  out.normalGain = gain;
  out.baseRate = baseRate;
  u[0] = v[0] - baseRate * jbx;
  u[1] = v[1] - baseRate * jby;
  u[2] = v[2] - baseRate * jbz;
  const uNorm = Math.sqrt(u[0] * u[0] + u[1] * u[1] + u[2] * u[2]);
  out.remainderNorm = uNorm;
  if (b >= 0) rates[b] = baseRate;

  if (!out.available) {
    out.pivotChange = 0;
    out.pivotAngle = pv >= 0 ? finger.angles[pv] : Number.NaN;
    out.aligned = false;
    out.misalignment = Number.NaN;
    out.rollDistance = Number.NaN;
    out.rollRate = 0;
  } else {
    steer(finger, contact, out, ws);
  }

  // Jacobian after steering: the full solution's translational rows, with the joints beyond the pivot turned about the pivot line by pivotChange.
  const ja = out.jacobianAfter, before = full.jacobian.data, after = ja.data;
  ja.rows = 3;
  ja.cols = n;
  for (let i = 0; i < 3 * n; i++) after[i] = before[i];
  if (out.available && out.pivotChange !== 0) steeredColumns(finger, y, ws.steer, ja);
  const d = ja.data;
  let residual = 0;
  for (let i = 0; i < 3; i++) {
    let sum = 0;
    for (let k = 0; k < n; k++) sum += d[i * n + k] * rates[k];
    out.achieved[i] = sum;
    out.residual[i] = v[i] - sum;
    residual += out.residual[i] * out.residual[i];
  }
  out.residualNorm = Math.sqrt(residual);
  jacobianSingularValues(ja, out.singularValuesAfter);
  out.conditionAfter = conditionNumber(out.singularValuesAfter, 3);
  driveConditioning(finger, contact, settings, out, ws);
  let difference = 0;
  for (let k = 0; k < n; k++) {
    const dk = rates[k] - full.rates[k];
    out.rateDifference[k] = dk;
    difference += dk * dk;
  }
  out.rateDifferenceNorm = Math.sqrt(difference);
  return out;
}

/** Directions the drive columns must span after steering: the normal and the steered roll direction. */
const STEERED_RANK = 2;

/**
 * A pivot whose axis passes through the contact steers by turning the roll direction and adds
 * nothing to the contact velocity, so its zero column says nothing about what the finger can do.
 */
function driveConditioning(finger: Finger, contact: Contact, settings: SolverSettings, out: SteerAndRoll, ws: SolveWorkspace): void {
  const n = finger.jointCount, pv = finger.pivotIndex;
  out.pivotDrives = pv < 0 || !(contact.pivotAxisDistance < settings.axisDistance);
  const skip = out.pivotDrives ? -1 : pv;
  const m = out.pivotDrives ? n : n - 1;
  out.driveColumnCount = m;
  const from = out.jacobianAfter.data, s = out.driveSingularValues;
  if (m === 2) {
    // The usual finger: base and roll, read in place.
    const first = skip === 0 ? 1 : 0;
    const second = skip === first + 1 ? first + 2 : first + 1;
    twoColumnSingularValues(from, n, first, second, s);
  } else {
    const drive = ws.drive, to = drive.data;
    for (let k = 0, c = 0; k < n; k++) {
      if (k === skip) continue;
      to[c] = from[k];
      to[m + c] = from[n + k];
      to[2 * m + c] = from[2 * n + k];
      c++;
    }
    drive.rows = 3;
    drive.cols = m;
    jacobianSingularValues(drive, s);
  }
  // Steering supplies the third direction by choosing the roll direction, so the drive columns need
  // only span two: the normal (base) and the steered roll direction.
  const weakest = s[(m < STEERED_RANK ? m : STEERED_RANK) - 1];
  out.driveRatio = m > 0 && s[0] > 0 ? weakest / s[0] : 0;
}

/**
 * Singular values of the 3 x 2 matrix [c1 c2] of columns i and k of the 3 x n row-major d into out, padded with a zero: sigma_1^2 is
 * the larger eigenvalue (a + b) / 2 + sqrt(((a - b) / 2)^2 + g^2) of the Gram matrix [[a, g], [g, b]], and
 * sigma_1 sigma_2 = |c1 x c2| (Lagrange's identity), which keeps sigma_2 accurate relative to itself (m/rad).
 */
function twoColumnSingularValues(d: Float64Array, n: number, i: number, k: number, out: Float64Array): void {
  const x1 = d[i], y1 = d[n + i], z1 = d[2 * n + i], x2 = d[k], y2 = d[n + k], z2 = d[2 * n + k];
  const a = x1 * x1 + y1 * y1 + z1 * z1, b = x2 * x2 + y2 * y2 + z2 * z2, g = x1 * x2 + y1 * y2 + z1 * z2;
  const half = 0.5 * (a - b);
  const largest = 0.5 * (a + b) + Math.sqrt(half * half + g * g);
  const cx = y1 * z2 - z1 * y2, cy = z1 * x2 - x1 * z2, cz = x1 * y2 - y1 * x2;
  const s1 = Math.sqrt(largest);
  out[0] = s1;
  out[1] = s1 > 0 ? Math.sqrt(cx * cx + cy * cy + cz * cz) / s1 : 0;
  out[2] = 0;
}

/**
 * Rodrigues about the pivot (unit k through q): R(delta) x = A + B cos delta + C sin delta with
 * A = (k . x) k, B = x - A, C = k x x. With e = y - q and g = w_roll x (r_roll - q), the roll
 * direction d(delta) = R w_roll x e - R g is linear in (1, cos, sin), so aligning it with the
 * remainder u (m . d = 0 for m = n x u) is a + b cos delta + c sin delta = 0.
 */
function steer(finger: Finger, contact: Contact, out: SteerAndRoll, ws: SolveWorkspace): void {
  const uNorm = out.remainderNorm;
  const axes = finger.axes, points = finger.points;
  const po = 3 * finger.pivotIndex, ro = 3 * finger.rollIndex;
  const kx = axes[po], ky = axes[po + 1], kz = axes[po + 2];
  const qx = points[po], qy = points[po + 1], qz = points[po + 2];
  const y = contact.rollerPoint, nrm = contact.normal, u = out.remainder;
  const ex = y[0] - qx, ey = y[1] - qy, ez = y[2] - qz;
  const wx = axes[ro], wy = axes[ro + 1], wz = axes[ro + 2];
  const sx = points[ro] - qx, sy = points[ro + 1] - qy, sz = points[ro + 2] - qz;
  const gx = wy * sz - wz * sy, gy = wz * sx - wx * sz, gz = wx * sy - wy * sx;
  const kw = kx * wx + ky * wy + kz * wz;
  const awx = kw * kx, awy = kw * ky, awz = kw * kz;
  const bwx = wx - awx, bwy = wy - awy, bwz = wz - awz;
  const cwx = ky * wz - kz * wy, cwy = kz * wx - kx * wz, cwz = kx * wy - ky * wx;
  const kg = kx * gx + ky * gy + kz * gz;
  const agx = kg * kx, agy = kg * ky, agz = kg * kz;
  const bgx = gx - agx, bgy = gy - agy, bgz = gz - agz;
  const cgx = ky * gz - kz * gy, cgy = kz * gx - kx * gz, cgz = kx * gy - ky * gx;
  const D = ws.steer;
  D[0] = awy * ez - awz * ey - agx; D[1] = awz * ex - awx * ez - agy; D[2] = awx * ey - awy * ex - agz;
  D[3] = bwy * ez - bwz * ey - bgx; D[4] = bwz * ex - bwx * ez - bgy; D[5] = bwx * ey - bwy * ex - bgz;
  D[6] = cwy * ez - cwz * ey - cgx; D[7] = cwz * ex - cwx * ez - cgy; D[8] = cwx * ey - cwy * ex - cgz;

  let delta = 0, cos = 1, sin = 0;
  let aligned = false;
  if (uNorm > 0) {
    const mx = (nrm[1] * u[2] - nrm[2] * u[1]) / uNorm;
    const my = (nrm[2] * u[0] - nrm[0] * u[2]) / uNorm;
    const mz = (nrm[0] * u[1] - nrm[1] * u[0]) / uNorm;
    const a = mx * D[0] + my * D[1] + mz * D[2];
    const bc = mx * D[3] + my * D[4] + mz * D[5];
    const cs = mx * D[6] + my * D[7] + mz * D[8];
    const amplitude = Math.sqrt(bc * bc + cs * cs);
    if (amplitude > 0) {
      // Roots delta = phi +- spread with cos phi = bc / amplitude, sin phi = cs / amplitude and
      // cos spread = -a / amplitude; their cosines and sines follow from the angle-sum formulas.
      const cosPhi = bc / amplitude, sinPhi = cs / amplitude;
      const ratio = -a / amplitude;
      const reachable = ratio >= -1 && ratio <= 1;
      // Out of reach: the closest approach is where the cosine saturates.
      const cosSpread = ratio > 1 ? 1 : ratio < -1 ? -1 : ratio;
      const sinSpread = Math.sqrt(1 - cosSpread * cosSpread);
      const cosFirst = cosPhi * cosSpread - sinPhi * sinSpread, sinFirst = sinPhi * cosSpread + cosPhi * sinSpread;
      const cosSecond = cosPhi * cosSpread + sinPhi * sinSpread, sinSecond = sinPhi * cosSpread - cosPhi * sinSpread;
      // A root where d vanishes aligns nothing; of the usable roots take the one nearer the current
      // angle, i.e. the one with the larger cosine.
      let scale = 0;
      for (let i = 0; i < 9; i++) scale += D[i] * D[i];
      const firstUsable = rollDirectionSquared(D, cosFirst, sinFirst) > 1e-18 * scale;
      const secondUsable = rollDirectionSquared(D, cosSecond, sinSecond) > 1e-18 * scale;
      if (firstUsable && (!secondUsable || cosFirst >= cosSecond)) {
        cos = cosFirst; sin = sinFirst;
      } else if (secondUsable) {
        cos = cosSecond; sin = sinSecond;
      }
      delta = Math.atan2(sin, cos);
      aligned = reachable && (firstUsable || secondUsable);
    }
  }
  const dx = D[0] + D[3] * cos + D[6] * sin;
  const dy = D[1] + D[4] * cos + D[7] * sin;
  const dz = D[2] + D[5] * cos + D[8] * sin;
  const dd = dx * dx + dy * dy + dz * dz;
  const du = dx * u[0] + dy * u[1] + dz * u[2];
  D[9] = cos;
  D[10] = sin;
  out.pivotChange = delta;
  out.pivotAngle = finger.angles[finger.pivotIndex] + delta;
  out.aligned = aligned || uNorm === 0;
  out.rollDistance = Math.sqrt(dd);
  out.rollRate = dd > 0 ? du / dd : 0;
  out.rates[finger.rollIndex] = out.rollRate;
  // An exact alignment leaves only rounding between d and u; the angle matters only when it is real.
  if (aligned || !(dd > 0 && uNorm > 0)) {
    out.misalignment = 0;
  } else {
    const crossX = dy * u[2] - dz * u[1], crossY = dz * u[0] - dx * u[2], crossZ = dx * u[1] - dy * u[0];
    out.misalignment = Math.atan2(Math.sqrt(crossX * crossX + crossY * crossY + crossZ * crossZ), Math.abs(du));
  }
}

function rollDirectionSquared(D: Float64Array, c: number, s: number): number {
  const x = D[0] + D[3] * c + D[6] * s, y = D[1] + D[4] * c + D[7] * s, z = D[2] + D[5] * c + D[8] * s;
  return x * x + y * y + z * z;
}

/**
 * Rewrites the Jacobian columns of joints after the pivot as if the pivot had turned by the angle whose cosine and sine
 * steer left in entries 9 and 10 (m/rad); they are read here because numbers passed to a call that is not inlined are boxed.
 */
function steeredColumns(finger: Finger, y: ArrayLike<number>, steered: Float64Array, j: Matrix): void {
  const axes = finger.axes, points = finger.points, n = finger.jointCount, d = j.data;
  const c = steered[9], s = steered[10];
  const po = 3 * finger.pivotIndex;
  const kx = axes[po], ky = axes[po + 1], kz = axes[po + 2];
  const qx = points[po], qy = points[po + 1], qz = points[po + 2];
  const v = 1 - c;
  const r0 = 1 - v * (ky * ky + kz * kz), r1 = v * kx * ky - s * kz, r2 = v * kx * kz + s * ky;
  const r3 = v * kx * ky + s * kz, r4 = 1 - v * (kx * kx + kz * kz), r5 = v * ky * kz - s * kx;
  const r6 = v * kx * kz - s * ky, r7 = v * ky * kz + s * kx, r8 = 1 - v * (kx * kx + ky * ky);
  for (let k = finger.pivotIndex + 1; k < n; k++) {
    const o = 3 * k;
    const ax = axes[o], ay = axes[o + 1], az = axes[o + 2];
    const wx = r0 * ax + r1 * ay + r2 * az, wy = r3 * ax + r4 * ay + r5 * az, wz = r6 * ax + r7 * ay + r8 * az;
    const px = points[o] - qx, py = points[o + 1] - qy, pz = points[o + 2] - qz;
    const ex = y[0] - (r0 * px + r1 * py + r2 * pz + qx);
    const ey = y[1] - (r3 * px + r4 * py + r5 * pz + qy);
    const ez = y[2] - (r6 * px + r7 * py + r8 * pz + qz);
    d[k] = wy * ez - wz * ey;
    d[n + k] = wz * ex - wx * ez;
    d[2 * n + k] = wx * ey - wy * ex;
  }
}
