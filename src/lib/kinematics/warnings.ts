/**
 * Coded warnings raised by a sheet solve. The catalogue is the single source of each code's
 * severity, title and explanation; a raised warning adds the finger (and joint), the measured
 * value and the threshold it crossed.
 */
import type { SolverSettings } from '../sheet/types';
import type { Contact } from './contact';
import type { GraspResult } from './grasp';
import type { Finger } from './hand';
import type { FullSolution } from './full-solution';
import type { SteerAndRoll } from './steer-and-roll';

export type WarningSeverity = 'note' | 'caution' | 'singular';

export type WarningCode =
  | 'CONTACT_NEAR_ROLL_AXIS'
  | 'CONTACT_NEAR_PIVOT_AXIS'
  | 'TANGENTIAL_SPEED_NEAR_ZERO'
  | 'JACOBIAN_NEAR_RANK_LOSS'
  | 'NORMAL_VELOCITY_UNREACHABLE'
  | 'JOINT_LIMIT_EXCEEDED'
  | 'RATE_LIMIT_EXCEEDED'
  | 'CONTACT_LOST'
  | 'CONTACT_PENETRATING'
  | 'GRASP_RANK_DEFICIENT'
  | 'PIVOT_MISSES_ROLLER_CENTRE'
  | 'STEER_CANNOT_ALIGN'
  | 'SLIP_REQUIRED';

export interface WarningInfo {
  severity: WarningSeverity;
  /** Short title for lists and margin notes. */
  title: string;
  /** One plain-words sentence used as the warning message. */
  message: string;
  /** What it means and what to do about it. */
  explanation: string;
  /** Unit of value and threshold. */
  unit: string;
  /** What a raised warning's value is: the judged quantity. */
  valueMeaning: string;
  /** What its threshold is: the limit the value was judged against. */
  thresholdMeaning: string;
}

/** A raised warning; finger and joint are indices into the sheet's hand (undefined when not tied to one). */
export interface SheetWarning {
  code: WarningCode;
  severity: WarningSeverity;
  finger: number | undefined;
  joint: number | undefined;
  message: string;
  /** The measured quantity and the threshold it crossed, in the catalogue unit. */
  value: number;
  threshold: number;
}

/** Every warning code with its severity, title, message, explanation and what its value and threshold are. */
export const WARNING_CATALOGUE: Readonly<Record<WarningCode, WarningInfo>> = {
  CONTACT_NEAR_ROLL_AXIS: {
    severity: 'caution',
    title: 'Contact near the roll axis',
    message: 'The contact point lies close to the roll axis, so rolling barely moves it.',
    explanation:
      'Rolling moves the contact at a speed equal to the roll rate times the distance from the contact to the roll axis. Near the axis that distance vanishes and the roll rate needed grows without bound. Move the contact away from the roller pole, or tilt the roller.',
    unit: 'm',
    valueMeaning: 'the distance from the contact point to the roll axis',
    thresholdMeaning: 'the axis-distance setting (solver.axisDistance); raised below it',
  },
  CONTACT_NEAR_PIVOT_AXIS: {
    severity: 'note',
    title: 'Contact near the pivot axis',
    message: 'The contact point lies close to the pivot axis, so the pivot only spins the roller about the contact.',
    explanation:
      'Turning the pivot then steers the roll direction without moving the contact, which is what steering wants, but the pivot contributes almost nothing to the contact velocity and the contact Jacobian loses a column.',
    unit: 'm',
    valueMeaning: 'the distance from the contact point to the pivot axis',
    thresholdMeaning: 'the axis-distance setting (solver.axisDistance); raised below it',
  },
  TANGENTIAL_SPEED_NEAR_ZERO: {
    severity: 'note',
    title: 'Tangential speed near zero',
    message: 'The roller has almost no tangential velocity to produce, so the steering direction is undefined.',
    explanation:
      'The pivot angle is chosen to point the roll direction along the tangential velocity left after the base motion. When that velocity is almost zero any pivot angle works; the steer-and-roll solution keeps the current one.',
    unit: 'm/s',
    valueMeaning: 'the speed the roller must produce: the steer-and-roll remainder, or the tangential speed when steer-and-roll is not available',
    thresholdMeaning: 'the minimum tangential speed setting (solver.minTangentialSpeed); raised below it',
  },
  JACOBIAN_NEAR_RANK_LOSS: {
    severity: 'singular',
    title: 'Contact Jacobian near rank loss',
    message: 'The finger cannot move its contact point freely in all three directions here.',
    explanation:
      'The ratio of the smallest to the largest singular value of the contact Jacobian is below the singular-ratio setting. A finger with base, pivot and roll joints is judged after steering, on the columns that drive the contact (base, roll and other joints; the pivot only when its axis misses the contact, since a pivot through the contact steers by turning the roll direction and moves nothing), which must span the normal and the steered roll direction. Any other finger is judged on its full Jacobian at the current angles. Joint rates along the weak direction become large or the solve leaves slip. Change the finger posture or the contact location.',
    unit: '1',
    valueMeaning: 'the ratio of the smallest to the largest singular value of the judged Jacobian, rankRatio on the finger result',
    thresholdMeaning: 'the singular-ratio setting (solver.singularRatio); raised below it',
  },
  NORMAL_VELOCITY_UNREACHABLE: {
    severity: 'singular',
    title: 'Normal velocity unreachable',
    message: 'No base joint can produce the contact velocity along the normal.',
    explanation:
      'The object surface moves toward or away from the roller, but the finger has no base joint or its base joints move the contact almost only tangentially (the length of their normal gains, the normal speed per unit length of the base-rate vector, is below the axis-distance setting). The contact will open or press in.',
    unit: 'm/rad',
    valueMeaning: 'the normal contact speed the base joints produce per unit length of their rate vector, the length of their normal gains (0 without a base joint)',
    thresholdMeaning: 'the axis-distance setting (solver.axisDistance) read per radian; raised below it while the normal speed exceeds solver.minTangentialSpeed',
  },
  JOINT_LIMIT_EXCEEDED: {
    severity: 'caution',
    title: 'Joint limit exceeded',
    message: 'A joint angle, or the pivot angle steering asks for, is outside its limits.',
    explanation: 'The value is the angle and the threshold the limit it crosses. Re-plan the motion or widen the limit if the mechanism allows it.',
    unit: 'rad',
    valueMeaning: 'the joint angle, or the pivot angle steering asks for',
    thresholdMeaning: 'the limit it crosses (limits.min or limits.max of the joint)',
  },
  RATE_LIMIT_EXCEEDED: {
    severity: 'caution',
    title: 'Rate limit exceeded',
    message: 'A joint would have to turn faster than its rate limit.',
    explanation:
      'The value is the largest joint speed asked for by the full or the steer-and-roll solution. In a run, a steered pivot reaches its new angle within one tick, so its speed there is the pivot change divided by the tick length. Slow the object motion down or move the contact where the joint has more leverage.',
    unit: 'rad/s',
    valueMeaning: 'the larger of the full and steer-and-roll rate magnitudes of the joint',
    thresholdMeaning: 'the rate limit of the joint (rateLimit); raised above it',
  },
  CONTACT_LOST: {
    severity: 'caution',
    title: 'Contact lost',
    message: 'The roller does not touch the object: the gap is larger than the contact tolerance.',
    explanation: 'Rolling kinematics assume touching bodies. The rates are computed for the nearest points all the same; close the gap first.',
    unit: 'm',
    valueMeaning: 'the gap between roller and object',
    thresholdMeaning: 'the contact tolerance (solver.contactTolerance); raised above it',
  },
  CONTACT_PENETRATING: {
    severity: 'caution',
    title: 'Contact penetrating',
    message: 'The roller overlaps the object by more than the contact tolerance.',
    explanation: 'Real bodies cannot overlap; the input geometry or pose is inconsistent. Rates refer to the deepest contact direction.',
    unit: 'm',
    valueMeaning: 'the gap between roller and object, negative for an overlap',
    thresholdMeaning: 'minus the contact tolerance (solver.contactTolerance); raised below it',
  },
  GRASP_RANK_DEFICIENT: {
    severity: 'caution',
    title: 'Grasp cannot drive every object motion',
    message: 'Some object twists move no contact point, so no set of contact velocities can drive them.',
    explanation:
      'The stacked contact map of all contacts has rank below 6. The result lists the object twist directions in its null space; motions along them are not controlled by the rollers.',
    unit: '1',
    valueMeaning: 'the rank of the contact map of all contacts',
    thresholdMeaning: '6, the rank at which the contacts drive every object twist; raised below it',
  },
  PIVOT_MISSES_ROLLER_CENTRE: {
    severity: 'note',
    title: 'Pivot axis misses the roller centre',
    message: 'The pivot axis does not pass through the roller centre, so steering also moves the contact.',
    explanation:
      'The steer-and-roll solution assumes the contact point stays put while the pivot turns, which holds only when the pivot axis passes through the roller centre. It is then only approximate; compare it with the full solution.',
    unit: 'm',
    valueMeaning: 'the distance from the roller centre to the pivot axis',
    thresholdMeaning: 'the axis-distance setting (solver.axisDistance); raised above it',
  },
  STEER_CANNOT_ALIGN: {
    severity: 'caution',
    title: 'Steering cannot align the roll direction',
    message: 'No pivot angle points the roll direction along the velocity the roller must produce.',
    explanation:
      'The pivot turns the roll direction on a cone that does not contain the needed direction; the steer-and-roll solution uses the pivot angle that leaves the least slip, and the value is that slip, judged against the slip tolerance (a misalignment that leaves less slip than that is not reported).',
    unit: 'm/s',
    valueMeaning: 'the slip left at the least-slip pivot angle (steer.residualNorm)',
    thresholdMeaning: 'the slip tolerance: the larger of solver.minTangentialSpeed and 0.1 % of the contact speed; raised above it',
  },
  SLIP_REQUIRED: {
    severity: 'caution',
    title: 'Slip required',
    message: 'No joint rates make the roller follow the object exactly; the remaining velocity would have to slip.',
    explanation:
      'The residual of the solution the finger uses exceeds the slip tolerance (the larger of the minimum tangential speed setting and 0.1 % of the contact speed): the steer-and-roll residual after steering for a finger with base, pivot and roll joints, otherwise the residual of the full damped least-squares solution.',
    unit: 'm/s',
    valueMeaning: 'the residual of the solution the finger uses: steer-and-roll after steering, or full damped least squares',
    thresholdMeaning: 'the slip tolerance: the larger of solver.minTangentialSpeed and 0.1 % of the contact speed; raised above it',
  },
};

/** Warning codes in catalogue order: bit i of a warning mask stands for WARNING_CODES[i]. */
export const WARNING_CODES: readonly WarningCode[] = Object.keys(WARNING_CATALOGUE) as WarningCode[];

/** Severities from none to worst: a severity's rank is its index here. */
export const SEVERITY_LEVELS: readonly (WarningSeverity | 'none')[] = ['none', 'note', 'caution', 'singular'];

if (WARNING_CODES.length > 32) throw new Error('a warning mask holds at most 32 codes');

const CODE_BIT = Object.fromEntries(WARNING_CODES.map((code, i) => [code, 1 << i])) as Record<WarningCode, number>;
const SEVERITY_RANK = Object.fromEntries(SEVERITY_LEVELS.map((level, i) => [level, i])) as Record<WarningSeverity | 'none', number>;

/** Bit of the code in a warning mask. */
export function warningBit(code: WarningCode): number {
  return CODE_BIT[code];
}

/** Index of the severity in SEVERITY_LEVELS. */
export function severityRank(severity: WarningSeverity | 'none'): number {
  return SEVERITY_RANK[severity];
}

/**
 * What raising one code writes, looked up once when the module loads: the per-finger checks run every tick of a run,
 * where three string-keyed lookups per raised warning cost more than the checks themselves.
 */
interface RaisedCode {
  code: WarningCode;
  severity: WarningSeverity;
  message: string;
  bit: number;
  rank: number;
}

function raisedCode(code: WarningCode): RaisedCode {
  const { severity, message } = WARNING_CATALOGUE[code];
  return { code, severity, message, bit: CODE_BIT[code], rank: SEVERITY_RANK[severity] };
}

const RAISED = Object.fromEntries(WARNING_CODES.map((code) => [code, raisedCode(code)])) as Record<WarningCode, RaisedCode>;
const {
  CONTACT_LOST, CONTACT_PENETRATING, CONTACT_NEAR_ROLL_AXIS, CONTACT_NEAR_PIVOT_AXIS,
  PIVOT_MISSES_ROLLER_CENTRE, TANGENTIAL_SPEED_NEAR_ZERO, STEER_CANNOT_ALIGN, JACOBIAN_NEAR_RANK_LOSS,
  NORMAL_VELOCITY_UNREACHABLE, SLIP_REQUIRED, JOINT_LIMIT_EXCEEDED, RATE_LIMIT_EXCEEDED,
  GRASP_RANK_DEFICIENT,
} = RAISED;

/** A fixed pool of warning objects reused across solves (allocation-free raising). */
export interface WarningList {
  /** Active warnings, in the order raised. */
  items: SheetWarning[];
  pool: SheetWarning[];
  count: number;
  /** Bit mask over WARNING_CODES of the warnings raised since clearWarnings. */
  mask: number;
  /** SEVERITY_LEVELS index of the worst warning raised since clearWarnings (0 for none). */
  worstRank: number;
}

/** New warning list. */
export function createWarningList(): WarningList {
  return { items: [], pool: [], count: 0, mask: 0, worstRank: 0 };
}

/** Empties the list, keeping its pooled objects. */
export function clearWarnings(list: WarningList): void {
  list.count = 0;
  list.mask = 0;
  list.worstRank = 0;
}

/** Trims `items` to the warnings raised since clearWarnings (no allocation when the count is unchanged). */
export function finishWarnings(list: WarningList): SheetWarning[] {
  if (list.items.length !== list.count) list.items.length = list.count;
  return list.items;
}

/** Raises a warning with its measured value and the threshold it crossed (units as in the catalogue). */
export function raiseWarning(list: WarningList, code: WarningCode, finger: number | undefined, joint: number | undefined, value: number, threshold: number): SheetWarning {
  return raise(list, RAISED[code], finger, joint, value, threshold);
}

function raise(list: WarningList, raised: RaisedCode, finger: number | undefined, joint: number | undefined, value: number, threshold: number): SheetWarning {
  let w = list.pool[list.count];
  if (w === undefined) {
    w = { code: raised.code, severity: raised.severity, finger, joint, message: raised.message, value, threshold };
    list.pool.push(w);
  } else {
    w.code = raised.code;
    w.severity = raised.severity;
    w.finger = finger;
    w.joint = joint;
    w.message = raised.message;
    w.value = value;
    w.threshold = threshold;
  }
  list.items[list.count] = w;
  list.count++;
  list.mask = (list.mask | raised.bit) >>> 0;
  if (raised.rank > list.worstRank) list.worstRank = raised.rank;
  return w;
}

/** One sentence with the numbers: "finger 'index': <message> (value 0.0004 m, threshold 0.001 m)". */
export function formatWarning(w: SheetWarning, fingerNames: readonly string[] = []): string {
  const unit = WARNING_CATALOGUE[w.code].unit;
  const suffix = unit === '1' ? '' : ` ${unit}`;
  const where = w.finger === undefined ? '' : `finger '${fingerNames[w.finger] ?? w.finger}'${w.joint === undefined ? '' : `, joint ${w.joint}`}: `;
  return `${where}${w.message} (value ${formatNumber(w.value)}${suffix}, threshold ${formatNumber(w.threshold)}${suffix})`;
}

function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Number(x.toPrecision(4)).toString();
}

/** Share of the contact speed that may remain as residual before slip is reported (dimensionless). */
export const SLIP_RELATIVE_TOLERANCE = 1e-3;

/** Residual speed above which SLIP_REQUIRED is raised, m/s. */
export function slipTolerance(contactSpeed: number, settings: SolverSettings): number {
  return Math.max(settings.minTangentialSpeed, SLIP_RELATIVE_TOLERANCE * contactSpeed);
}

/** Which Jacobian a finger's rank and slip are judged on: after steering when steer-and-roll is available, else the full one. */
export type JudgedBasis = 'steered' | 'full';

/** 'steered' when the finger has base, pivot and roll joints, else 'full'. */
export function judgedBasis(steer: SteerAndRoll): JudgedBasis {
  return steer.available ? 'steered' : 'full';
}

/** sigma_min / sigma_max compared with the singular-ratio setting: of the steered drive columns, or of the full Jacobian (dimensionless). */
export function judgedRankRatio(full: FullSolution, steer: SteerAndRoll): number {
  return steer.available ? steer.driveRatio : full.singularRatio;
}

/** Residual speed compared with the slip tolerance: steer-and-roll after steering, or full damped least squares (m/s). */
export function judgedSlip(full: FullSolution, steer: SteerAndRoll): number {
  return steer.available ? steer.residualNorm : full.residualNorm;
}

const RANK_MESSAGE_STEERED = `${WARNING_CATALOGUE.JACOBIAN_NEAR_RANK_LOSS.message} Judged after steering, on the base, roll and other drive columns.`;
const RANK_MESSAGE_FULL = `${WARNING_CATALOGUE.JACOBIAN_NEAR_RANK_LOSS.message} Judged on the full Jacobian at the current joint angles.`;
const SLIP_MESSAGE_STEERED = `${WARNING_CATALOGUE.SLIP_REQUIRED.message} Judged on the steer-and-roll residual after steering.`;
const SLIP_MESSAGE_FULL = `${WARNING_CATALOGUE.SLIP_REQUIRED.message} Judged on the full damped least-squares residual.`;

/** Raises every per-finger warning for finger index i after its contact and solutions are computed. */
export function checkFinger(list: WarningList, i: number, finger: Finger, contact: Contact, full: FullSolution, steer: SteerAndRoll, settings: SolverSettings): void {
  const tolerance = settings.contactTolerance;
  if (contact.gap > tolerance) raise(list, CONTACT_LOST, i, undefined, contact.gap, tolerance);
  else if (contact.gap < -tolerance) raise(list, CONTACT_PENETRATING, i, undefined, contact.gap, -tolerance);

  const axisDistance = settings.axisDistance;
  if (contact.rollAxisDistance < axisDistance) raise(list, CONTACT_NEAR_ROLL_AXIS, i, finger.rollIndex, contact.rollAxisDistance, axisDistance);
  if (contact.pivotAxisDistance < axisDistance) raise(list, CONTACT_NEAR_PIVOT_AXIS, i, finger.pivotIndex, contact.pivotAxisDistance, axisDistance);
  if (contact.pivotCenterDistance > axisDistance) raise(list, PIVOT_MISSES_ROLLER_CENTRE, i, finger.pivotIndex, contact.pivotCenterDistance, axisDistance);

  const v = contact.objectVelocity;
  const speed = Math.sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
  const slip = slipTolerance(speed, settings);

  // The steer direction comes from what the roller must supply after the base motion.
  const steerSpeed = steer.available ? steer.remainderNorm : contact.tangentialSpeed;
  if (steerSpeed < settings.minTangentialSpeed) raise(list, TANGENTIAL_SPEED_NEAR_ZERO, i, undefined, steerSpeed, settings.minTangentialSpeed);
  else if (steer.available && !steer.aligned && steer.residualNorm > slip) raise(list, STEER_CANNOT_ALIGN, i, finger.pivotIndex, steer.residualNorm, slip);

  const rankRatio = judgedRankRatio(full, steer);
  if (rankRatio < settings.singularRatio) {
    raise(list, JACOBIAN_NEAR_RANK_LOSS, i, undefined, rankRatio, settings.singularRatio).message = steer.available ? RANK_MESSAGE_STEERED : RANK_MESSAGE_FULL;
  }

  if (Math.abs(contact.normalSpeed) > settings.minTangentialSpeed && !(Math.abs(steer.normalGain) >= axisDistance)) {
    raise(list, NORMAL_VELOCITY_UNREACHABLE, i, finger.baseIndex >= 0 ? finger.baseIndex : undefined, Math.abs(steer.normalGain), axisDistance);
  }

  const residual = judgedSlip(full, steer);
  if (residual > slip) raise(list, SLIP_REQUIRED, i, undefined, residual, slip).message = steer.available ? SLIP_MESSAGE_STEERED : SLIP_MESSAGE_FULL;

  for (let k = 0; k < finger.jointCount; k++) {
    const angle = finger.angles[k];
    if (angle < finger.lowerLimits[k]) raise(list, JOINT_LIMIT_EXCEEDED, i, k, angle, finger.lowerLimits[k]);
    else if (angle > finger.upperLimits[k]) raise(list, JOINT_LIMIT_EXCEEDED, i, k, angle, finger.upperLimits[k]);
    else if (k === finger.pivotIndex && steer.available) {
      if (steer.pivotAngle < finger.lowerLimits[k]) raise(list, JOINT_LIMIT_EXCEEDED, i, k, steer.pivotAngle, finger.lowerLimits[k]);
      else if (steer.pivotAngle > finger.upperLimits[k]) raise(list, JOINT_LIMIT_EXCEEDED, i, k, steer.pivotAngle, finger.upperLimits[k]);
    }
    const rate = Math.max(Math.abs(full.rates[k]), Math.abs(steer.rates[k]));
    if (rate > finger.rateLimits[k]) raise(list, RATE_LIMIT_EXCEEDED, i, k, rate, finger.rateLimits[k]);
  }
}

/** Raises GRASP_RANK_DEFICIENT when the contacts cannot drive every object twist. */
export function checkGrasp(list: WarningList, grasp: GraspResult): void {
  if (grasp.rank < 6) raise(list, GRASP_RANK_DEFICIENT, undefined, undefined, grasp.rank, 6);
}
