/**
 * The per-solve kernel of the usual finger, one base, one pivot and one roll joint in that order with a point contact:
 * its full damped least-squares solution (full-solution.ts) and its steer-and-roll solution (steer-and-roll.ts) in one
 * pass over the nine Jacobian entries held in locals, with the Gram matrix J J^T formed once for the damped solve and
 * the singular values. Every number follows the operation order of solveFull and solveSteerAndRoll, so both routes
 * give the same results to the bit; any other finger takes those two stages.
 */
import type { SolverSettings } from '../sheet/types';
import type { Contact } from './contact';
import { columnPairSingularValues, jacobianSingularValues, largestGramEigenvalue } from './eigen3';
import type { FullSolution } from './full-solution';
import type { Finger } from './hand';
import { dampedLeastSquares, type LinalgWorkspace } from './linalg';
import { steerPivot, type SteerAndRoll, type SteerWorkspace } from './steer-and-roll';

/** Relative Cholesky pivot below which the normal equations lose too many digits: linalg.ts's own, which then takes the SVD route. */
const NORMAL_EQUATIONS_MIN_PIVOT = 1e-8;

/** Whether solveSteeredFinger covers the finger under these settings: joints base, pivot, roll in that order and a point contact. */
export function isSteeredFinger(finger: Finger, steer: SteerAndRoll, settings: SolverSettings): boolean {
  return finger.jointCount === 3 && finger.baseIndex === 0 && finger.pivotIndex === 1 && finger.rollIndex === 2 && steer.baseJoints.length === 1 && !settings.softFinger;
}

/**
 * Full and steer-and-roll solutions of a finger that isSteeredFinger accepts, after its contact (world frame, SI): what
 * solveFull (report) or solveFullRates (run) and then solveSteerAndRoll(..., report) write, the same numbers. In a run
 * the full Jacobian's conditioning is left out, as there, since the warnings judge this finger after steering.
 */
export function solveSteeredFinger(
  finger: Finger, contact: Contact, settings: SolverSettings, full: FullSolution, out: SteerAndRoll, fullWs: LinalgWorkspace, steerWs: SteerWorkspace, report: boolean,
): void {
  const axes = finger.axes, points = finger.points;
  const y = contact.rollerPoint, v = contact.objectVelocity, nrm = contact.normal;
  const y0 = y[0], y1 = y[1], y2 = y[2];
  const v0 = v[0], v1 = v[1], v2 = v[2];

  // Columns w_k x (y - r_k) of the base (0), pivot (1) and roll (2) joints; jRC is row R, column C.
  let wx = axes[0], wy = axes[1], wz = axes[2];
  let ex = y0 - points[0], ey = y1 - points[1], ez = y2 - points[2];
  const j00 = wy * ez - wz * ey, j10 = wz * ex - wx * ez, j20 = wx * ey - wy * ex;
  wx = axes[3]; wy = axes[4]; wz = axes[5];
  ex = y0 - points[3]; ey = y1 - points[4]; ez = y2 - points[5];
  const j01 = wy * ez - wz * ey, j11 = wz * ex - wx * ez, j21 = wx * ey - wy * ex;
  wx = axes[6]; wy = axes[7]; wz = axes[8];
  ex = y0 - points[6]; ey = y1 - points[7]; ez = y2 - points[8];
  const j02 = wy * ez - wz * ey, j12 = wz * ex - wx * ez, j22 = wx * ey - wy * ex;
  const jacobian = full.jacobian, d = jacobian.data;
  jacobian.rows = 3;
  jacobian.cols = 3;
  d[0] = j00; d[1] = j01; d[2] = j02;
  d[3] = j10; d[4] = j11; d[5] = j12;
  d[6] = j20; d[7] = j21; d[8] = j22;
  const target = full.target;
  target[0] = v0; target[1] = v1; target[2] = v2; target[3] = 0;
  full.rows = 3;

  // J J^T with the rows of J as a, b, c, summed over the joints in order as the damped solve sums it.
  const g00 = 0 + j00 * j00 + j01 * j01 + j02 * j02;
  const g10 = 0 + j10 * j00 + j11 * j01 + j12 * j02;
  const g11 = 0 + j10 * j10 + j11 * j11 + j12 * j12;
  const g20 = 0 + j20 * j00 + j21 * j01 + j22 * j02;
  const g21 = 0 + j20 * j10 + j21 * j11 + j22 * j12;
  const g22 = 0 + j20 * j20 + j21 * j21 + j22 * j22;

  // Damped least squares by the Cholesky factor of J J^T + lambda^2 I, as linalg.ts's three-row route computes it.
  const fullRates = full.rates;
  const damping = settings.damping * settings.damping;
  const h00 = g00 + damping, h11 = g11 + damping, h22 = g22 + damping;
  let maxDiag = 0;
  if (h00 > maxDiag) maxDiag = h00;
  if (h11 > maxDiag) maxDiag = h11;
  if (h22 > maxDiag) maxDiag = h22;
  const minPivot = NORMAL_EQUATIONS_MIN_PIVOT * maxDiag;
  let solved = false;
  if (h00 > minPivot) {
    const l00 = Math.sqrt(h00);
    const l10 = g10 / l00, l20 = g20 / l00;
    const diag1 = h11 - l10 * l10;
    if (diag1 > minPivot) {
      const l11 = Math.sqrt(diag1);
      const l21 = (g21 - l20 * l10) / l11;
      const diag2 = h22 - l20 * l20 - l21 * l21;
      if (diag2 > minPivot) {
        const l22 = Math.sqrt(diag2);
        const f0 = v0 / l00;
        const f1 = (v1 - l10 * f0) / l11;
        const f2 = (v2 - l20 * f0 - l21 * f1) / l22;
        const z2 = f2 / l22;
        const z1 = (f1 - l21 * z2) / l11;
        const z0 = (f0 - l10 * z1 - l20 * z2) / l00;
        fullRates[0] = 0 + j00 * z0 + j10 * z1 + j20 * z2;
        fullRates[1] = 0 + j01 * z0 + j11 * z1 + j21 * z2;
        fullRates[2] = 0 + j02 * z0 + j12 * z1 + j22 * z2;
        solved = true;
      }
    }
  }
  // Too ill-conditioned for the normal equations: the general routine, which takes its SVD route here.
  if (!solved) dampedLeastSquares(jacobian, target, settings.damping, fullRates, fullWs);
  const q0 = fullRates[0], q1 = fullRates[1], q2 = fullRates[2];
  const achieved = full.achieved, residual = full.residual;
  let sum = 0 + j00 * q0 + j01 * q1 + j02 * q2;
  achieved[0] = sum;
  const r0 = v0 - sum;
  sum = 0 + j10 * q0 + j11 * q1 + j12 * q2;
  achieved[1] = sum;
  const r1 = v1 - sum;
  sum = 0 + j20 * q0 + j21 * q1 + j22 * q2;
  achieved[2] = sum;
  const r2 = v2 - sum;
  residual[0] = r0; residual[1] = r1; residual[2] = r2;
  achieved[3] = 0;
  residual[3] = 0;
  full.residualNorm = Math.sqrt(0 + r0 * r0 + r1 * r1 + r2 * r2);
  full.spinResidual = 0;
  // contactRankTolerance for three joints and three rows.
  const yScale = Math.abs(y0) + Math.abs(y1) + Math.abs(y2);
  let scale = 0;
  for (let o = 0; o < 9; o += 3) scale += yScale + Math.abs(points[o]) + Math.abs(points[o + 1]) + Math.abs(points[o + 2]);
  const tolerance = 3 * Number.EPSILON * scale;
  full.rankTolerance = tolerance;

  if (report) {
    // jacobianSingularValues for three columns, from the Gram matrix above: the 2 x 2 minors are the entries of
    // a x b, a x c and b x c, the 3 x 3 minor is a . (b x c).
    const abx = j01 * j12 - j02 * j11, aby = j02 * j10 - j00 * j12, abz = j00 * j11 - j01 * j10;
    const acx = j01 * j22 - j02 * j21, acy = j02 * j20 - j00 * j22, acz = j00 * j21 - j01 * j20;
    const bcx = j11 * j22 - j12 * j21, bcy = j12 * j20 - j10 * j22, bcz = j10 * j21 - j11 * j20;
    const e2 = abx * abx + aby * aby + abz * abz + acx * acx + acy * acy + acz * acz + bcx * bcx + bcy * bcy + bcz * bcz;
    const det = j00 * bcx + j01 * bcy + j02 * bcz;
    const s = full.singularValues;
    const largest = largestGramEigenvalue(g00, g11, g22, g10, g20, g21, e2, det * det);
    const s1Squared = largest > 0 ? largest : 0;
    const sigma1 = Math.sqrt(s1Squared);
    let sigma2 = 0, sigma3 = 0;
    if (s1Squared !== 0) {
      const inverse = 1 / s1Squared;
      const product = det * det * inverse;
      const sumSquares = Math.max(0, (e2 - product) * inverse);
      const discriminant = Math.max(0, sumSquares * sumSquares - 4 * product);
      const larger = 0.5 * (sumSquares + Math.sqrt(discriminant));
      sigma2 = Math.sqrt(larger);
      sigma3 = larger > 0 ? Math.sqrt(product / larger) : 0;
    }
    s[0] = sigma1; s[1] = sigma2; s[2] = sigma3;
    full.manipulability = sigma1 * sigma2 * sigma3;
    const rank = (sigma1 > tolerance ? 1 : 0) + (sigma2 > tolerance ? 1 : 0) + (sigma3 > tolerance ? 1 : 0);
    full.rank = rank;
    full.conditionNumber = conditionOfThree(sigma1, sigma2, sigma3, tolerance);
    full.singularRatio = rank === 3 ? sigma3 / sigma1 : 0;
  }

  // Steer-and-roll: the base joint supplies the normal speed, the pivot steers, the roll joint supplies the rest.
  const rates = out.rates;
  out.conditionBefore = full.conditionNumber;
  out.available = true;
  const gain = nrm[0] * j00 + nrm[1] * j10 + nrm[2] * j20;
  out.normalGains[0] = gain;
  const gainSquared = 0 + gain * gain;
  const normalSpeed = nrm[0] * v0 + nrm[1] * v1 + nrm[2] * v2;
  const perGain = gainSquared > 0 && Number.isFinite(normalSpeed / gainSquared) ? normalSpeed / gainSquared : 0;
  out.normalGain = Math.sqrt(gainSquared);
  const baseRate = gain * perGain;
  out.baseRates[0] = baseRate;
  rates[0] = baseRate;
  rates[1] = 0;
  rates[2] = 0;
  const u = out.remainder;
  const u0 = v0 - baseRate * j00, u1 = v1 - baseRate * j10, u2 = v2 - baseRate * j20;
  u[0] = u0; u[1] = u1; u[2] = u2;
  out.remainderNorm = Math.sqrt(u0 * u0 + u1 * u1 + u2 * u2);
  steerPivot(finger, contact, out, settings, steerWs.rollDirection, steerWs.pivotTurn);
  const rollRate = rates[2];

  // The roll column after steering: the roll joint turned about the pivot line by pivotChange (steeredColumns).
  let a02 = j02, a12 = j12, a22 = j22;
  if (out.pivotChange !== 0) {
    const turn = steerWs.pivotTurn;
    const c = turn[0], sn = turn[1];
    const kx = axes[3], ky = axes[4], kz = axes[5];
    const qx = points[3], qy = points[4], qz = points[5];
    const w = 1 - c;
    const m0 = 1 - w * (ky * ky + kz * kz), m1 = w * kx * ky - sn * kz, m2 = w * kx * kz + sn * ky;
    const m3 = w * kx * ky + sn * kz, m4 = 1 - w * (kx * kx + kz * kz), m5 = w * ky * kz - sn * kx;
    const m6 = w * kx * kz - sn * ky, m7 = w * ky * kz + sn * kx, m8 = 1 - w * (kx * kx + ky * ky);
    const ax = axes[6], ay = axes[7], az = axes[8];
    const rx = m0 * ax + m1 * ay + m2 * az, ry = m3 * ax + m4 * ay + m5 * az, rz = m6 * ax + m7 * ay + m8 * az;
    const px = points[6] - qx, py = points[7] - qy, pz = points[8] - qz;
    const fx = y0 - (m0 * px + m1 * py + m2 * pz + qx);
    const fy = y1 - (m3 * px + m4 * py + m5 * pz + qy);
    const fz = y2 - (m6 * px + m7 * py + m8 * pz + qz);
    a02 = ry * fz - rz * fy;
    a12 = rz * fx - rx * fz;
    a22 = rx * fy - ry * fx;
  }
  const ja = out.jacobianAfter, after = ja.data;
  ja.rows = 3;
  ja.cols = 3;
  after[0] = j00; after[1] = j01; after[2] = a02;
  after[3] = j10; after[4] = j11; after[5] = a12;
  after[6] = j20; after[7] = j21; after[8] = a22;
  const achievedAfter = out.achieved, slip = out.residual;
  sum = 0 + j00 * baseRate + j01 * 0 + a02 * rollRate;
  achievedAfter[0] = sum;
  const t0 = v0 - sum;
  sum = 0 + j10 * baseRate + j11 * 0 + a12 * rollRate;
  achievedAfter[1] = sum;
  const t1 = v1 - sum;
  sum = 0 + j20 * baseRate + j21 * 0 + a22 * rollRate;
  achievedAfter[2] = sum;
  const t2 = v2 - sum;
  slip[0] = t0; slip[1] = t1; slip[2] = t2;
  out.residualNorm = Math.sqrt(0 + t0 * t0 + t1 * t1 + t2 * t2);

  // Drive columns after steering: base and roll, with the pivot only when its axis misses the contact.
  out.pivotDrives = !(contact.pivotAxisDistance < settings.axisDistance);
  const driveSingular = out.driveSingularValues;
  if (out.pivotDrives) {
    out.driveColumnCount = 3;
    jacobianSingularValues(ja, driveSingular);
  } else {
    out.driveColumnCount = 2;
    columnPairSingularValues(after, 3, 0, 2, driveSingular);
  }
  const weakest = driveSingular[1];
  out.driveRatio = weakest > tolerance && driveSingular[0] > 0 ? weakest / driveSingular[0] : 0;
  if (!report) return;

  const sa = out.singularValuesAfter;
  if (out.pivotChange !== 0) {
    // With the pivot among the drive columns they are the whole Jacobian after steering, whose singular values are then known.
    if (out.pivotDrives) {
      sa[0] = driveSingular[0]; sa[1] = driveSingular[1]; sa[2] = driveSingular[2];
    } else {
      jacobianSingularValues(ja, sa);
    }
    out.conditionAfter = conditionOfThree(sa[0], sa[1], sa[2], tolerance);
  } else {
    const sf = full.singularValues;
    sa[0] = sf[0]; sa[1] = sf[1]; sa[2] = sf[2];
    out.conditionAfter = full.conditionNumber;
  }
  const difference = out.rateDifference;
  const d0 = baseRate - q0, d1 = 0 - q1, d2 = rollRate - q2;
  difference[0] = d0; difference[1] = d1; difference[2] = d2;
  out.rateDifferenceNorm = Math.sqrt(0 + d0 * d0 + d1 * d1 + d2 * d2);
}

/** conditionNumber of linalg.ts for three singular values and a tolerance (dimensionless): Infinity at or below the tolerance, NaN for zeros. */
function conditionOfThree(s0: number, s1: number, s2: number, tolerance: number): number {
  let max = 0, min = Number.POSITIVE_INFINITY;
  if (s0 > max) max = s0;
  if (s0 < min) min = s0;
  if (s1 > max) max = s1;
  if (s1 < min) min = s1;
  if (s2 > max) max = s2;
  if (s2 < min) min = s2;
  if (max === 0) return Number.NaN;
  return min <= tolerance ? Number.POSITIVE_INFINITY : max / min;
}
