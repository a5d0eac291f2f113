/**
 * Feed-forward of the steer-and-roll solution at one contact (world frame, SI). Steer-and-roll keeps
 * three rules at every instant: the base joints supply the normal speed with the least rates
 * b = a (n . v) / |a|^2, a_k = n . (w_k x (y - r_k)); the pivot turns the roll direction
 * d = w_roll x (y - r_roll) into the plane of n and the remainder u = v - sum_k b_k (w_k x (y - r_k)),
 * f = (n x u) . d = 0; the roll joint supplies rho = u . d / |d|^2. Differentiating the three rules along
 * the motion, with the contact travelling over both surfaces as in acceleration.ts, gives the pivot rate
 * that keeps f = 0 and the rates of b and rho. Every term is linear in the joint rates, so f_dot is
 * affine in the pivot rate psi_dot: psi_dot = -f_dot(0) / (f_dot(1) - f_dot(0)). Computed at the
 * steered posture (the joints beyond the pivot turned by steer.pivotChange), once per evaluation.
 */
import type { FingerInput, SolverSettings } from '../sheet/types';
import { applyShapeOperator, contactPointVelocities, type ContactCurvature } from './curvature';
import type { FingerResult } from './scene';
import { cross, dot } from './vec3';

/**
 * 'defined', or why the feed-forward does not exist: 'not-available' (no base, pivot and roll joint),
 * 'at-rest' (the remainder is below the minimum tangential speed, so its direction is noise),
 * 'roll-axis' (the contact lies on the roll axis at every pivot angle), 'not-aligned' (the velocity
 * solution fell back to the least-slip angle), 'contact-motion' (the contact point's motion over the
 * surfaces is not defined: line contact, sharp edge, not touching), 'not-steered' (the pivot is not at
 * its steered angle and turning it moves the roller surface at the contact, whose contact was not
 * computed), 'pivot-ineffective' (turning the pivot does not turn the roll direction out of the plane),
 * 'out-of-range' (a number leaves the floating-point range, which only happens next to a rank loss).
 */
export type SteerAccelerationStatus =
  | 'defined' | 'not-available' | 'at-rest' | 'roll-axis' | 'not-aligned' | 'contact-motion' | 'not-steered' | 'pivot-ineffective' | 'out-of-range';

/** Feed-forward of one finger's steer-and-roll solution (world frame, SI); every number NaN unless status is 'defined'. */
export interface SteerAcceleration {
  status: SteerAccelerationStatus;
  /** Indices of the pivot and roll joints in the sheet's joint order (-1 without one). */
  pivotJoint: number;
  rollJoint: number;
  /** psi_dot: rate of the steered pivot angle, rad/s. */
  pivotRate: number;
  /** f_dot at psi_dot = 0, m^2/(rad s^2), and d f_dot / d psi_dot, m^2/(rad^2 s): the alignment's rate without and per unit pivot rate. */
  alignmentRate: number;
  alignmentGain: number;
  /** c_dot = v_o(x) + u_o: velocity of the contact point, m/s. */
  contactVelocity: Float64Array;
  /** u_o: velocity of the contact point over the object at the steer-and-roll rates, m/s. */
  overObject: Float64Array;
  /** n_dot = omega_o x n + L_o u_o, 1/s. */
  normalRate: Float64Array;
  /** d/dt v_o(x) = a(x) + omega_o x u_o, m/s^2. */
  objectVelocityRate: Float64Array;
  /** a_dot per base joint: rate of the normal gains, m/(rad s). */
  normalGainRates: Float64Array;
  /** b_dot per base joint: the minimum-norm base accelerations, rad/s^2. */
  baseAccelerations: Float64Array;
  /** u_dot: rate of the remainder the roller supplies, m/s^2. */
  remainderRate: Float64Array;
  /** d_dot: rate of the roll direction w_roll x (y - r_roll), m/(rad s). */
  rollDirectionRate: Float64Array;
  /** rho_dot: the roll acceleration, rad/s^2. */
  rollAcceleration: number;
}

/** A pivot change below this is rounding of the steering solve: the finger stands at its steered angle. */
const STEERED_TOLERANCE = 1e-9;

/**
 * d f_dot / d psi_dot below this fraction of |u| |d| (its size when the pivot turns d about the normal)
 * means the pivot cannot turn the roll direction out of the plane of n and u.
 */
const PIVOT_EFFECT_FLOOR = 1e-9;

/** New, not-defined steer-and-roll feed-forward for a finger of the given base joint count. */
export function createSteerAcceleration(baseJointCount: number): SteerAcceleration {
  const nan = (count: number) => new Float64Array(count).fill(Number.NaN);
  return {
    status: 'not-available',
    pivotJoint: -1,
    rollJoint: -1,
    pivotRate: Number.NaN,
    alignmentRate: Number.NaN,
    alignmentGain: Number.NaN,
    contactVelocity: nan(3),
    overObject: nan(3),
    normalRate: nan(3),
    objectVelocityRate: nan(3),
    normalGainRates: nan(baseJointCount),
    baseAccelerations: nan(baseJointCount),
    remainderRate: nan(3),
    rollDirectionRate: nan(3),
    rollAcceleration: Number.NaN,
  };
}

/** The finger at its steered posture: axes and points with the joints beyond the pivot turned by the pivot change about the pivot line (world frame, m). */
function steeredJoints(finger: Readonly<FingerResult>, pivot: number): { axes: Float64Array; points: Float64Array } {
  const axes = Float64Array.from(finger.jointAxes), points = Float64Array.from(finger.jointPoints);
  const delta = finger.steer.pivotChange;
  if (delta === 0) return { axes, points };
  const k = axes.subarray(3 * pivot, 3 * pivot + 3), q = points.subarray(3 * pivot, 3 * pivot + 3);
  const c = Math.cos(delta), s = Math.sin(delta);
  // Rodrigues: R x = x cos + (k x x) sin + k (k . x)(1 - cos).
  const turn = (x: number[]): number[] => {
    const kx = cross(k, x), along = dot(k, x) * (1 - c);
    return [0, 1, 2].map((i) => x[i] * c + kx[i] * s + k[i] * along);
  };
  for (let j = pivot + 1; j < axes.length / 3; j++) {
    const o = 3 * j;
    const axis = turn([axes[o], axes[o + 1], axes[o + 2]]);
    const offset = turn([points[o] - q[0], points[o + 1] - q[1], points[o + 2] - q[2]]);
    for (let i = 0; i < 3; i++) {
      axes[o + i] = axis[i];
      points[o + i] = q[i] + offset[i];
    }
  }
  return { axes, points };
}

/** What the motion gives at one trial pivot rate; every field is affine in that rate. */
interface TrialMotion {
  alignmentRate: number;
  contactVelocity: number[];
  overObject: number[];
  normalRate: number[];
  objectVelocityRate: number[];
  normalGainRates: number[];
  baseAccelerations: number[];
  remainderRate: number[];
  rollDirectionRate: number[];
  rollAcceleration: number;
}

interface SteerState {
  axes: Float64Array;
  points: Float64Array;
  /** Steer-and-roll rates with the pivot entry set per trial, rad/s. */
  rates: Float64Array;
  pivot: number;
  roll: number;
  baseJoints: readonly number[];
  y: ArrayLike<number>;
  normal: ArrayLike<number>;
  objectVelocity: ArrayLike<number>;
  objectPointAcceleration: ArrayLike<number>;
  objectAngularVelocity: ArrayLike<number>;
  curvature: Readonly<ContactCurvature>;
}

const axisOf = (s: SteerState, k: number) => [s.axes[3 * k], s.axes[3 * k + 1], s.axes[3 * k + 2]];
const pointOf = (s: SteerState, k: number) => [s.points[3 * k], s.points[3 * k + 1], s.points[3 * k + 2]];
const minus = (a: ArrayLike<number>, b: ArrayLike<number>) => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const plus = (a: ArrayLike<number>, b: ArrayLike<number>) => [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
const times = (a: ArrayLike<number>, s: number) => [a[0] * s, a[1] * s, a[2] * s];

/** Column w_k x (y - r_k) of joint k and its rate w_k_dot x (y - r_k) + w_k x (c_dot - r_k_dot) at the state's rates (m/rad, m/(rad s)). */
function columnAndRate(s: SteerState, k: number, contactVelocity: ArrayLike<number>): { column: number[]; rate: number[] } {
  const w = axisOf(s, k), r = pointOf(s, k);
  // The joints before k turn its axis and carry its point: w_k_dot = W x w_k, r_k_dot = sum_j q_dot_j w_j x (r_k - r_j).
  let before = [0, 0, 0], pointRate = [0, 0, 0];
  for (let j = 0; j < k; j++) {
    const wj = axisOf(s, j);
    before = plus(before, times(wj, s.rates[j]));
    pointRate = plus(pointRate, times(cross(wj, minus(r, pointOf(s, j))), s.rates[j]));
  }
  const lever = minus(s.y, r);
  return { column: cross(w, lever), rate: plus(cross(cross(before, w), lever), cross(w, minus(contactVelocity, pointRate))) };
}

/** The differentiated steering rules at the state's rates; undefined where the contact point's motion is not. */
function trialMotion(s: SteerState, pivotRate: number): TrialMotion | undefined {
  s.rates[s.pivot] = pivotRate;
  const n = s.normal, v = s.objectVelocity, omegaO = s.objectAngularVelocity;
  let omegaF = [0, 0, 0], rollerVelocity = [0, 0, 0];
  for (let k = 0; k < s.rates.length; k++) {
    const w = axisOf(s, k);
    omegaF = plus(omegaF, times(w, s.rates[k]));
    rollerVelocity = plus(rollerVelocity, times(cross(w, minus(s.y, pointOf(s, k))), s.rates[k]));
  }
  const slip = minus(v, rollerVelocity);
  const tangentialSlip = minus(slip, times(n, dot(n, slip)));
  const c = s.curvature;
  const wander = contactPointVelocities(
    c.object, c.roller, c.relative, n, [omegaO[0] - omegaF[0], omegaO[1] - omegaF[1], omegaO[2] - omegaF[2]],
    [tangentialSlip[0], tangentialSlip[1], tangentialSlip[2]], true,
  );
  if (wander.status !== 'defined' || !wander.objectVelocity) return undefined;
  const overObject = wander.objectVelocity;
  const contactVelocity = plus(v, overObject);
  const normalRate = plus(cross(omegaO, n), applyShapeOperator(c.object, overObject));
  const objectVelocityRate = plus(s.objectPointAcceleration, cross(omegaO, overObject));

  // Minimum-norm base rates b_k = a_k s / |a|^2 with s = n . v, differentiated by the quotient rule.
  const normalSpeed = dot(n, v), normalSpeedRate = dot(normalRate, v) + dot(n, objectVelocityRate);
  const bases = s.baseJoints.map((k) => columnAndRate(s, k, contactVelocity));
  const gains = bases.map(({ column }) => dot(n, column));
  const gainRates = bases.map(({ column, rate }) => dot(normalRate, column) + dot(n, rate));
  const gainSquared = gains.reduce((sum, a) => sum + a * a, 0);
  const gainProduct = gains.reduce((sum, a, j) => sum + a * gainRates[j], 0);
  const baseAccelerations = gains.map((a, j) => (gainSquared > 0
    ? (gainRates[j] * normalSpeed + a * normalSpeedRate) / gainSquared - (2 * a * normalSpeed * gainProduct) / (gainSquared * gainSquared)
    : 0));
  let remainder = [v[0], v[1], v[2]], remainderRate = [objectVelocityRate[0], objectVelocityRate[1], objectVelocityRate[2]];
  bases.forEach(({ column, rate }, j) => {
    const b = s.rates[s.baseJoints[j]];
    remainder = minus(remainder, times(column, b));
    remainderRate = minus(remainderRate, plus(times(column, baseAccelerations[j]), times(rate, b)));
  });

  const { column: d, rate: rollDirectionRate } = columnAndRate(s, s.roll, contactVelocity);
  const alignmentRate = dot(plus(cross(normalRate, remainder), cross(n, remainderRate)), d) + dot(cross(n, remainder), rollDirectionRate);
  const dd = dot(d, d), rollRate = dot(remainder, d) / dd;
  const rollAcceleration = (dot(remainderRate, d) + dot(remainder, rollDirectionRate) - 2 * rollRate * dot(d, rollDirectionRate)) / dd;
  return {
    alignmentRate, contactVelocity, overObject, normalRate, objectVelocityRate, normalGainRates: gainRates, baseAccelerations, remainderRate,
    rollDirectionRate, rollAcceleration,
  };
}

/** Why the feed-forward of a solved finger does not exist, before any rate is differentiated; 'defined' when it may. */
function precondition(
  finger: Readonly<FingerResult>, input: Readonly<Pick<FingerInput, 'roller'>>, curvature: Readonly<ContactCurvature> | undefined, settings: Readonly<SolverSettings>,
): SteerAccelerationStatus {
  const steer = finger.steer;
  if (!steer.available) return 'not-available';
  if (!(steer.remainderNorm > 0) || steer.remainderNorm < settings.minTangentialSpeed) return 'at-rest';
  // Steerable but not aligned: roll rate 0 means no pivot angle gives a roll direction (contact on the roll axis).
  if (!steer.aligned) return steer.rollRate === 0 ? 'roll-axis' : 'not-aligned';
  if (!curvature || curvature.wander.status !== 'defined') return 'contact-motion';
  // A ball centred on the pivot axis is the same surface at every pivot angle, so this contact is the steered posture's.
  const ballOnPivot = input.roller.kind === 'sphere' && finger.contact.pivotCenterDistance < settings.axisDistance;
  if (Math.abs(steer.pivotChange) > STEERED_TOLERANCE && !ballOnPivot) return 'not-steered';
  return 'defined';
}

/** Pivot rate (rad/s), base and roll accelerations (rad/s^2) that keep one solved finger's steer-and-roll rules along the object's motion, given the acceleration a(x) of the object's material point at the contact (m/s^2), at the steered posture (world frame). */
export function solveSteerAcceleration(
  finger: Readonly<FingerResult>, input: Readonly<Pick<FingerInput, 'joints' | 'roller'>>, objectAngularVelocity: ArrayLike<number>,
  objectPointAcceleration: ArrayLike<number>, curvature: Readonly<ContactCurvature> | undefined, settings: Readonly<SolverSettings>,
  out: SteerAcceleration = createSteerAcceleration(finger.steer.baseJoints.length),
): SteerAcceleration {
  const pivot = input.joints.findIndex((j) => j.role === 'pivot'), roll = input.joints.findIndex((j) => j.role === 'roll');
  out.pivotJoint = pivot;
  out.rollJoint = roll;
  // Every early return below leaves the numbers empty, whatever a reused `out` held.
  out.pivotRate = out.alignmentRate = out.alignmentGain = out.rollAcceleration = Number.NaN;
  for (const v of [out.contactVelocity, out.overObject, out.normalRate, out.objectVelocityRate, out.normalGainRates, out.baseAccelerations, out.remainderRate, out.rollDirectionRate]) v.fill(Number.NaN);
  out.status = precondition(finger, input, curvature, settings);
  if (out.status !== 'defined') return out;
  const { axes, points } = steeredJoints(finger, pivot);
  const contact = finger.contact;
  const state: SteerState = {
    axes, points, rates: Float64Array.from(finger.steer.rates), pivot, roll, baseJoints: finger.steer.baseJoints,
    y: contact.rollerPoint, normal: contact.normal, objectVelocity: contact.objectVelocity, objectPointAcceleration,
    objectAngularVelocity, curvature: curvature!,
  };
  const still = trialMotion(state, 0), unit = trialMotion(state, 1);
  if (!still || !unit) {
    out.status = 'contact-motion';
    return out;
  }
  // A sheet whose other results are finite must still evaluate, so an overflow here is reported, not raised.
  if (!Number.isFinite(still.alignmentRate) || !Number.isFinite(unit.alignmentRate)) {
    out.status = 'out-of-range';
    return out;
  }
  const gain = unit.alignmentRate - still.alignmentRate;
  const scale = finger.steer.remainderNorm * finger.steer.rollDistance;
  if (!(Math.abs(gain) > PIVOT_EFFECT_FLOOR * scale)) {
    out.status = 'pivot-ineffective';
    return out;
  }
  const pivotRate = -still.alignmentRate / gain;
  const m = trialMotion(state, pivotRate);
  if (!m) {
    out.status = 'contact-motion';
    return out;
  }
  const numbers = [pivotRate, still.alignmentRate, gain, m.rollAcceleration, ...m.baseAccelerations, ...m.normalGainRates, ...m.remainderRate, ...m.rollDirectionRate];
  if (!numbers.every(Number.isFinite)) {
    out.status = 'out-of-range';
    return out;
  }
  out.pivotRate = pivotRate;
  out.alignmentRate = still.alignmentRate;
  out.alignmentGain = gain;
  out.contactVelocity.set(m.contactVelocity);
  out.overObject.set(m.overObject);
  out.normalRate.set(m.normalRate);
  out.objectVelocityRate.set(m.objectVelocityRate);
  out.normalGainRates.set(m.normalGainRates);
  out.baseAccelerations.set(m.baseAccelerations);
  out.remainderRate.set(m.remainderRate);
  out.rollDirectionRate.set(m.rollDirectionRate);
  out.rollAcceleration = m.rollAcceleration;
  return out;
}
