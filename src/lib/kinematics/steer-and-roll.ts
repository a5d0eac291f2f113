/**
 * Steer-and-roll solution of the joint rates for rolling without slipping at one contact (world
 * frame, SI): the base joints supply the normal velocity (shared by the minimum-norm rule), the pivot turns the roll direction onto what
 * is left, and the roll joint supplies its magnitude; then the conditioning of the drive columns
 * after steering.
 */
import type { SolverSettings } from '../sheet/types';
import { indicesWhere } from './hidden-classes';
import type { Contact } from './contact';
import { columnPairSingularValues, jacobianSingularValues } from './eigen3';
import type { FullSolution } from './full-solution';
import type { Finger } from './hand';
import { conditionNumber, createMatrix, type Matrix } from './linalg';

/** Steer-and-roll solution for one finger (world frame, SI). */
export interface SteerAndRoll {
  /** The finger has a base, a pivot and a roll joint. */
  available: boolean;
  /** Indices of the finger's base joints, in the sheet's joint order. */
  baseJoints: number[];
  /** a_k = n . (w_k x (y - r_k)) per base joint k: normal contact speed per unit rate of that joint, m/rad. */
  normalGains: Float64Array;
  /** |a|, the length of the row of normal gains: normal contact speed per unit length of the base-rate vector, m/rad. */
  normalGain: number;
  /**
   * Minimum-norm base rates a_k (n . v_o) / |a|^2 per base joint, rad/s: the Moore-Penrose pseudo-inverse of the
   * 1 x k row a applied to the normal speed, so the base joints meet n . v_o with the least sum of squared rates
   * (all 0 when |a| vanishes).
   */
  baseRates: Float64Array;
  /** v_o(x) - sum_k baseRates_k (w_k x (y - r_k)), m/s: what the roller must supply. */
  remainder: Float64Array;
  remainderNorm: number;
  /**
   * Pivot change from the current angle and the steered pivot angle, rad: of the aligning angles the nearer; else the
   * least-slip angle; the current angle (roll rate 0) when every angle satisfies the rolling constraint: the roll
   * direction vanishes at every angle (contact on the roll axis) or the remainder is below the minimum tangential speed.
   */
  pivotChange: number;
  pivotAngle: number;
  /** The roll direction could be aligned exactly with the remainder (false when a remainder below the minimum tangential speed is left unsteered). */
  aligned: boolean;
  /** Angle between the steered roll direction and the remainder's line, rad (0 when aligned). */
  misalignment: number;
  /** Distance from the contact to the roll axis after steering, m. */
  rollDistance: number;
  /** Roll rate remainder . d / |d|^2 with d = w_roll x (y - r_roll) after steering, rad/s (= +-|remainder| / rollDistance when aligned). */
  rollRate: number;
  /** Joint rates: base joints and roll set, every other joint 0, rad/s. */
  rates: Float64Array;
  /** Translational Jacobian after steering (3 x joints, m/rad). */
  jacobianAfter: Matrix;
  /** J_after rates, m/s; residual v_o(x) - achieved and its norm: the slip left after steering. */
  achieved: Float64Array;
  residual: Float64Array;
  residualNorm: number;
  /** Condition numbers before and after steering (infinite at or below full.rankTolerance), and the singular values after (m/rad). */
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
   * span the normal and the steered roll direction; steering itself supplies the third direction. 0 also when that
   * weakest singular value is at or below full.rankTolerance.
   */
  driveRatio: number;
  /** rates - full solution rates, rad/s, and its norm. */
  rateDifference: Float64Array;
  rateDifferenceNorm: number;
}

/** Scratch for solveSteerAndRoll. */
export interface SteerWorkspace {
  /** D0, D1, D2 of the roll direction d(delta) = D0 + D1 cos delta + D2 sin delta, 3 numbers each. */
  rollDirection: Float64Array;
  /** Cosine and sine of the chosen pivot change. */
  pivotTurn: Float64Array;
  /** Drive columns of the steered Jacobian (3 x up to maxJoints). */
  drive: Matrix;
}

/** New scratch for solveSteerAndRoll on fingers of up to maxJoints joints. */
export function createSteerWorkspace(maxJoints: number): SteerWorkspace {
  return {
    rollDirection: new Float64Array(9), pivotTurn: new Float64Array(2), drive: createMatrix(3, Math.max(1, maxJoints)),
  };
}

/** Empty steer-and-roll solution shaped for the finger's joints and base joints. */
export function createSteerAndRoll(finger: Pick<Finger, 'jointCount' | 'roles'>): SteerAndRoll {
  const jointCount = finger.jointCount;
  const baseJoints = indicesWhere(finger.roles, (role) => role === 'base');
  return {
    available: false,
    baseJoints,
    normalGains: new Float64Array(baseJoints.length),
    normalGain: 0,
    baseRates: new Float64Array(baseJoints.length),
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
 * Steer-and-roll solution for one finger after solveFull, with the conditioning of its drive columns after steering (world frame, SI);
 * without `afterSteering` (runs, after solveFullRates) it leaves the singular values and condition number after steering and the rate
 * difference from the full solution at their previous values.
 */
export function solveSteerAndRoll(
  finger: Finger, contact: Contact, full: FullSolution, settings: SolverSettings, out: SteerAndRoll, ws: SteerWorkspace, afterSteering = true,
): SteerAndRoll {
  const n = finger.jointCount;
  const pv = finger.pivotIndex, rl = finger.rollIndex;
  const rates = out.rates;
  for (let k = 0; k < n; k++) rates[k] = 0;
  out.conditionBefore = full.conditionNumber;
  out.available = out.baseJoints.length > 0 && pv >= 0 && rl >= 0;
  const y = contact.rollerPoint, nrm = contact.normal, v = contact.objectVelocity;
  const u = out.remainder;

  // Base joints: the minimum-norm rates for the one equation sum_k a_k rate_k = n . v_o (pseudo-inverse of the row a).
  // Their translational columns w_k x (y - r_k) are those of the full Jacobian, read rather than computed again.
  const baseJoints = out.baseJoints, gains = out.normalGains, baseRates = out.baseRates, before = full.jacobian.data;
  const baseCount = baseJoints.length;
  let gainSquared = 0;
  for (let j = 0; j < baseCount; j++) {
    const k = baseJoints[j];
    const gain = nrm[0] * before[k] + nrm[1] * before[n + k] + nrm[2] * before[2 * n + k];
    gains[j] = gain;
    gainSquared += gain * gain;
  }
  const normalSpeed = nrm[0] * v[0] + nrm[1] * v[1] + nrm[2] * v[2];
  const perGain = gainSquared > 0 && Number.isFinite(normalSpeed / gainSquared) ? normalSpeed / gainSquared : 0;
  out.normalGain = Math.sqrt(gainSquared);
  u[0] = v[0]; u[1] = v[1]; u[2] = v[2];
  for (let j = 0; j < baseCount; j++) {
    const k = baseJoints[j], rate = gains[j] * perGain;
    baseRates[j] = rate;
    rates[k] = rate;
    u[0] -= rate * before[k];
    u[1] -= rate * before[n + k];
    u[2] -= rate * before[2 * n + k];
  }
  out.remainderNorm = Math.sqrt(u[0] * u[0] + u[1] * u[1] + u[2] * u[2]);

  if (!out.available) {
    out.pivotChange = 0;
    out.pivotAngle = pv >= 0 ? finger.angles[pv] : Number.NaN;
    out.aligned = false;
    out.misalignment = Number.NaN;
    out.rollDistance = Number.NaN;
    out.rollRate = 0;
  } else {
    steerPivot(finger, contact, out, settings, ws.rollDirection, ws.pivotTurn);
  }

  // Jacobian after steering: the full solution's translational rows, with the joints beyond the pivot turned about the pivot line by pivotChange.
  const ja = out.jacobianAfter, after = ja.data;
  ja.rows = 3;
  ja.cols = n;
  for (let i = 0; i < 3 * n; i++) after[i] = before[i];
  if (out.available && out.pivotChange !== 0) steeredColumns(finger, y, ws.pivotTurn, ja);
  const d = ja.data, achieved = out.achieved, slip = out.residual;
  let residual = 0;
  for (let i = 0; i < 3; i++) {
    let sum = 0;
    for (let k = 0, o = i * n; k < n; k++) sum += d[o + k] * rates[k];
    achieved[i] = sum;
    const left = v[i] - sum;
    slip[i] = left;
    residual += left * left;
  }
  out.residualNorm = Math.sqrt(residual);
  driveConditioning(finger, contact, settings, full, out, ws.drive);
  if (!afterSteering) return out;
  const sa = out.singularValuesAfter;
  if (out.available && out.pivotChange !== 0) {
    jacobianSingularValues(ja, sa);
    out.conditionAfter = conditionNumber(sa, 3, full.rankTolerance);
  } else {
    // Unturned, the Jacobian after steering is the full one, whose conditioning solveFull has just computed.
    const sf = full.singularValues;
    sa[0] = sf[0]; sa[1] = sf[1]; sa[2] = sf[2];
    out.conditionAfter = full.conditionNumber;
  }
  let difference = 0;
  const fullRates = full.rates, rateDifference = out.rateDifference;
  for (let k = 0; k < n; k++) {
    const dk = rates[k] - fullRates[k];
    rateDifference[k] = dk;
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
function driveConditioning(finger: Finger, contact: Contact, settings: SolverSettings, full: FullSolution, out: SteerAndRoll, drive: Matrix): void {
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
    columnPairSingularValues(from, n, first, second, s);
  } else {
    const to = drive.data;
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
  // only span two: the normal (base) and the steered roll direction. Below the finger's rank tolerance the
  // weakest is rounding and the columns have lost rank, as the full Jacobian's singularRatio judges it.
  const weakest = m > 0 ? s[(m < STEERED_RANK ? m : STEERED_RANK) - 1] : 0;
  out.driveRatio = weakest > full.rankTolerance && s[0] > 0 ? weakest / s[0] : 0;
}

/**
 * Roll directions below this fraction of the lever arms at every pivot angle are rounding: the contact lies on
 * the roll axis whatever the pivot does (perturbations of 1e-9 m stay below it for lever arms above 1 mm).
 */
const ROLL_AXIS_NOISE = 1e-6;

/**
 * Steers the pivot for the remainder and remainderNorm already in out (rad, m, rad/s): pivot change and angle, alignment,
 * misalignment, roll distance and roll rate (also into out.rates).
 * Rodrigues about the pivot (unit k through q): R(delta) x = A + B cos delta + C sin delta with
 * A = (k . x) k, B = x - A, C = k x x. With e = y - q and g = w_roll x (r_roll - q), the roll
 * direction d(delta) = R w_roll x e - R g is linear in (1, cos, sin), so aligning it with the
 * remainder u (m . d = 0 for m = n x u) is a + b cos delta + c sin delta = 0. Uses rollDirection
 * for D0, D1, D2 and writes the cosine and sine of the chosen pivot change into pivotTurn.
 * Choice of angle: of the two roots the nearer one; with no root the least-slip angle; when every angle satisfies
 * the rolling constraint, because d vanishes at every angle (contact on the roll axis) or the remainder is below
 * the minimum tangential speed (e.g. the object point at the contact at rest), the current angle with roll rate 0,
 * so that rounding does not pick the angle or the roll direction.
 */
export function steerPivot(finger: Finger, contact: Contact, out: SteerAndRoll, settings: SolverSettings, rollDirection: Float64Array, pivotTurn: Float64Array): void {
  const uNorm = out.remainderNorm;
  // Below the minimum tangential speed every pivot angle meets the rolling constraint to within the setting, and
  // the direction of u is rounding or noise (1e-9 m of object pose already turns it anywhere).
  const steerable = uNorm > 0 && !(uNorm < settings.minTangentialSpeed);
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
  const D = rollDirection;
  D[0] = awy * ez - awz * ey - agx; D[1] = awz * ex - awx * ez - agy; D[2] = awx * ey - awy * ex - agz;
  D[3] = bwy * ez - bwz * ey - bgx; D[4] = bwz * ex - bwx * ez - bgy; D[5] = bwx * ey - bwy * ex - bgz;
  D[6] = cwy * ez - cwz * ey - cgx; D[7] = cwz * ex - cwx * ez - cgy; D[8] = cwx * ey - cwy * ex - cgz;

  let delta = 0, cos = 1, sin = 0;
  let aligned = false;
  let scale = 0;
  for (let i = 0; i < 9; i++) scale += D[i] * D[i];
  const lever = Math.sqrt(ex * ex + ey * ey + ez * ez) + Math.sqrt(sx * sx + sy * sy + sz * sz);
  const rollable = scale > ROLL_AXIS_NOISE * ROLL_AXIS_NOISE * lever * lever;
  if (steerable && rollable) {
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
    if (!aligned) {
      delta = leastSlipPivotChange(D, u);
      cos = Math.cos(delta);
      sin = Math.sin(delta);
    }
  }
  const dx = D[0] + D[3] * cos + D[6] * sin;
  const dy = D[1] + D[4] * cos + D[7] * sin;
  const dz = D[2] + D[5] * cos + D[8] * sin;
  const dd = dx * dx + dy * dy + dz * dz;
  const du = dx * u[0] + dy * u[1] + dz * u[2];
  pivotTurn[0] = cos;
  pivotTurn[1] = sin;
  out.pivotChange = delta;
  out.pivotAngle = finger.angles[finger.pivotIndex] + delta;
  out.aligned = aligned || uNorm === 0;
  out.rollDistance = Math.sqrt(dd);
  out.rollRate = steerable && rollable && dd > 0 ? du / dd : 0;
  out.rates[finger.rollIndex] = out.rollRate;
  // An exact alignment leaves only rounding between d and u; the angle matters only when it is real.
  if (aligned || !(rollable && dd > 0 && steerable)) {
    out.misalignment = 0;
  } else {
    const crossX = dy * u[2] - dz * u[1], crossY = dz * u[0] - dx * u[2], crossZ = dx * u[1] - dy * u[0];
    out.misalignment = Math.atan2(Math.sqrt(crossX * crossX + crossY * crossY + crossZ * crossZ), Math.abs(du));
  }
}

/** Pivot samples of the least-slip search: fine enough that the best sample lies in the basin of the best angle. */
const SLIP_SEARCH_SAMPLES = 72;
/** Golden-section steps refining the best sample: the bracket of 2 (2 pi / samples) shrinks below 1e-11 rad. */
const SLIP_SEARCH_STEPS = 56;
const GOLDEN = (Math.sqrt(5) - 1) / 2;

/**
 * Pivot change (rad) minimising the slip |u - (u . d / |d|^2) d| that remains when no angle aligns the roll
 * direction d(delta) with the remainder u, i.e. maximising (u . d)^2 / |d|^2, a ratio of trigonometric
 * polynomials of orders 2 and 2 whose stationary points are the roots of one of order 3 (no closed form worth
 * its rounding): samples the turn from the current angle outwards, so of equal samples the smaller change
 * wins, then refines the best by golden section.
 */
function leastSlipPivotChange(D: Float64Array, u: Float64Array): number {
  const step = (2 * Math.PI) / SLIP_SEARCH_SAMPLES;
  let best = 0, bestGain = rolledGain(D, u, 0);
  for (let k = 1; k <= SLIP_SEARCH_SAMPLES / 2; k++) {
    for (let side = 1; side >= -1; side -= 2) {
      const delta = side * k * step;
      const gain = rolledGain(D, u, delta);
      if (gain > bestGain * (1 + 1e-12)) {
        best = delta;
        bestGain = gain;
      }
    }
  }
  let low = best - step, high = best + step;
  let left = high - GOLDEN * (high - low), right = low + GOLDEN * (high - low);
  let leftGain = rolledGain(D, u, left), rightGain = rolledGain(D, u, right);
  for (let i = 0; i < SLIP_SEARCH_STEPS; i++) {
    if (leftGain >= rightGain) {
      high = right;
      right = left;
      rightGain = leftGain;
      left = high - GOLDEN * (high - low);
      leftGain = rolledGain(D, u, left);
    } else {
      low = left;
      left = right;
      leftGain = rightGain;
      right = low + GOLDEN * (high - low);
      rightGain = rolledGain(D, u, right);
    }
  }
  const refined = 0.5 * (low + high);
  const chosen = rolledGain(D, u, refined) > bestGain ? refined : best;
  return Math.atan2(Math.sin(chosen), Math.cos(chosen));
}

/** (u . d)^2 / |d|^2 at pivot change delta: the part of |u|^2 the roll joint supplies (0 where d vanishes). */
function rolledGain(D: Float64Array, u: Float64Array, delta: number): number {
  const c = Math.cos(delta), s = Math.sin(delta);
  const x = D[0] + D[3] * c + D[6] * s, y = D[1] + D[4] * c + D[7] * s, z = D[2] + D[5] * c + D[8] * s;
  const dd = x * x + y * y + z * z, du = x * u[0] + y * u[1] + z * u[2];
  return dd > 0 ? (du * du) / dd : 0;
}

function rollDirectionSquared(D: Float64Array, c: number, s: number): number {
  const x = D[0] + D[3] * c + D[6] * s, y = D[1] + D[4] * c + D[7] * s, z = D[2] + D[5] * c + D[8] * s;
  return x * x + y * y + z * z;
}

/**
 * Rewrites the Jacobian columns of joints after the pivot as if the pivot had turned by the angle whose cosine and sine
 * are pivotTurn (m/rad); they come in an array because numbers passed to a call that is not inlined are boxed.
 */
export function steeredColumns(finger: Finger, y: ArrayLike<number>, pivotTurn: Float64Array, j: Matrix): void {
  const axes = finger.axes, points = finger.points, n = finger.jointCount, d = j.data;
  const c = pivotTurn[0], s = pivotTurn[1];
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
