/**
 * The output catalogue: every reported number of a solved sheet declared once, with its labels,
 * SI unit, display unit, frame and how to read it from a PlainSheetResult. The editor's results
 * table, the CSV export, the revision comparison and the report all read it; a leaf module the
 * browser may import.
 */
import type { PlainSheetResult, SteerAccelerationStatus } from '../kinematics';
import { DEFAULT_DISPLAY_UNITS, shownUnit, toShown, type DisplayUnits } from './display-units';

export type OutputValue = number | string;

/** Whose output it is: one per finger, one per joint of a finger, or one for the whole grasp. */
export type OutputScope = 'finger' | 'joint' | 'grasp';

/** The frame a vector output is expressed in: the palm (world) frame, as every vector the core reports; null for scalars. */
export type OutputFrame = 'palm' | null;

/** How labels name a frame. */
export const FRAME_NAMES: Record<Exclude<OutputFrame, null>, string> = { palm: 'palm frame' };

/** An output's label with its frame when it is a vector, e.g. "contact point (palm frame)"; `table` picks the results table's label. */
export function labelWithFrame(definition: OutputDefinition, table = false): string {
  const label = (table ? definition.tableLabel : undefined) ?? definition.label;
  return definition.frame ? `${label} (${FRAME_NAMES[definition.frame]})` : label;
}

/** How a multi-valued output is split into named parts when listed value by value. */
export type OutputParts = 'single' | 'xyz' | 'joints' | 'base-joints' | 'singular-values' | 'principal';

/**
 * How the editor shows a value: its unit under the default display units and its significant digits. Lengths, speeds,
 * angles and angular speeds follow the sheet's display units instead (see display-units.ts), converted by mathjs.
 */
export interface OutputDisplay {
  unit: string;
  digits: number;
}

/** Where the CSV export writes an output: one named column per part, or one numbered column per joint (or per base joint). */
export type OutputCsv = { columns: readonly string[] } | { perJoint: (joint: number) => string };

export interface OutputDefinition {
  /** Stable id; the results table marks cells `${finger}.${id}`. */
  id: string;
  /** As the report and the comparison list it. */
  label: string;
  /** As the editor's results table labels it, when it differs from `label`. */
  tableLabel?: string;
  /** SI unit ('' for counts, ratios and text). */
  unit: string;
  display: OutputDisplay;
  frame: OutputFrame;
  scope: OutputScope;
  parts: OutputParts;
  /** Listed in the report and compared between revisions. */
  compared: boolean;
  csv?: OutputCsv;
  /** The value in SI: a number or text, or one number per part. */
  read: (result: PlainSheetResult, finger: number) => OutputValue | readonly number[];
}


/**
 * A vector of the acceleration feed-forward, which only a sheet evaluation computes: results of a
 * sweep or a run have none, and read as NaN (shown "—") rather than as a zero acceleration.
 */
function accelerationOf(result: PlainSheetResult, finger: number, key: 'objectPoint' | 'centripetal' | 'jacobianRate' | 'rollingTerm' | 'jointAccelerations'): readonly number[] {
  const f = result.fingers[finger];
  return f.acceleration?.[key] ?? Array.from({ length: key === 'jointAccelerations' ? f.jointNames.length : 3 }, () => Number.NaN);
}
/** Why a finger's steer-and-roll feed-forward is not defined, in words, by its status (shown by the results and the derivation). */
export const STEER_FEEDFORWARD_REASONS: Record<Exclude<SteerAccelerationStatus, 'defined'>, string> = {
  'not-available': 'the finger has no base, pivot and roll joint',
  'at-rest': 'the remainder the roller supplies is below the minimum tangential speed, so its direction, and the steering, are noise',
  'roll-axis': 'the contact lies on the roll axis at every pivot angle, so there is no roll direction to keep aligned',
  'not-aligned': 'no pivot angle aligns the roll direction (least-slip fallback), so there is no alignment to keep',
  'contact-motion': "the contact point's motion over the surfaces is not defined (line contact, sharp edge or not touching)",
  'not-steered': 'the pivot is not yet at its steered angle and turning it changes the roller surface at the contact, which was not computed there',
  'pivot-ineffective': 'turning the pivot does not turn the roll direction out of the plane of the normal and the remainder',
  'out-of-range': 'a number leaves the floating-point range next to a rank loss of the drive columns',
};

/**
 * Steer-and-roll accelerations joint by joint: base and roll joints their feed-forward, other joints 0 as their rates,
 * the pivot NaN ("—": it follows its steered angle at the pivot rate, shown on its own); all NaN where the feed-forward is not defined.
 */
function steerJointAccelerations(result: PlainSheetResult, finger: number): readonly number[] {
  const f = result.fingers[finger], steer = f.acceleration?.steer;
  if (!steer || steer.status !== 'defined') return f.jointNames.map(() => Number.NaN);
  const values = f.jointNames.map(() => 0);
  f.steer.baseJoints.forEach((k, j) => { values[k] = steer.baseAccelerations[j]; });
  values[steer.rollJoint] = steer.rollAcceleration;
  values[steer.pivotJoint] = Number.NaN;
  return values;
}
/** Principal curvatures, or NaN twice where the contact has none (a sharp edge, or a result without curvature). */
const principal = (values: readonly number[] | null | undefined): readonly number[] => values ?? [Number.NaN, Number.NaN];
/** A palm-frame vector, or NaN three times where it does not exist. */
const vector = (values: readonly number[] | null | undefined): readonly number[] => values ?? [Number.NaN, Number.NaN, Number.NaN];

const unitless = (digits = 4): OutputDisplay => ({ unit: '', digits });
const shown = (unit: string, digits = 4): OutputDisplay => ({ unit, digits });

/**
 * Every output, per finger in the order a reader checks them (the order of the report, the
 * comparison and the CSV columns), then the grasp.
 */
export const OUTPUTS: readonly OutputDefinition[] = [
  {
    id: 'contact.state', label: 'contact state', unit: '', display: unitless(), frame: null, scope: 'finger', parts: 'single', compared: true,
    csv: { columns: ['contact_state'] }, read: (r, i) => r.fingers[i].contact.state,
  },
  {
    id: 'contact.gap', label: 'gap', unit: 'm', display: shown('mm'), frame: null, scope: 'finger', parts: 'single', compared: true,
    csv: { columns: ['gap_m'] }, read: (r, i) => r.fingers[i].contact.gap,
  },
  {
    id: 'contact.objectPoint', label: 'contact point', tableLabel: 'contact point x', unit: 'm', display: shown('mm'), frame: 'palm', scope: 'finger',
    parts: 'xyz', compared: true, read: (r, i) => r.fingers[i].contact.objectPoint,
  },
  {
    id: 'contact.normal', label: 'contact normal', tableLabel: 'normal n', unit: '', display: shown('1', 3), frame: 'palm', scope: 'finger',
    parts: 'xyz', compared: true, read: (r, i) => r.fingers[i].contact.normal,
  },
  {
    id: 'contact.normalSpeed', label: 'normal speed', tableLabel: 'normal velocity', unit: 'm/s', display: shown('mm/s'), frame: null,
    scope: 'finger', parts: 'single', compared: true, csv: { columns: ['normal_speed_m_s'] }, read: (r, i) => r.fingers[i].contact.normalSpeed,
  },
  {
    id: 'contact.tangentialSpeed', label: 'tangential speed', unit: 'm/s', display: shown('mm/s'), frame: null, scope: 'finger', parts: 'single',
    compared: true, csv: { columns: ['tangential_speed_m_s'] }, read: (r, i) => r.fingers[i].contact.tangentialSpeed,
  },
  {
    id: 'commanded.solution', label: 'commanded solution', tableLabel: 'commanded rates follow', unit: '', display: unitless(), frame: null,
    scope: 'finger', parts: 'single', compared: true, csv: { columns: ['commanded_solution'] },
    read: (r, i) => r.commanded?.fingers[i]?.solution ?? 'not computed',
  },
  {
    id: 'commanded.rates', label: 'commanded joint rate', tableLabel: 'commanded', unit: 'rad/s', display: shown('rad/s'), frame: null,
    scope: 'joint', parts: 'joints', compared: true, csv: { perJoint: (k) => `commanded_rate${k + 1}_rad_s` },
    read: (r, i) => r.commanded?.fingers[i]?.joints.map((joint) => joint.rate) ?? r.fingers[i].jointNames.map(() => Number.NaN),
  },
  {
    id: 'commanded.pivot.targetAngle', label: 'steered pivot: target angle', tableLabel: 'pivot target angle', unit: 'rad', display: shown('deg'),
    frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['pivot_target_angle_rad'] },
    read: (r, i) => r.commanded?.fingers[i]?.pivot?.targetAngle ?? Number.NaN,
  },
  {
    id: 'commanded.pivot.change', label: 'steered pivot: change from the current angle', tableLabel: 'pivot change', unit: 'rad',
    display: shown('deg'), frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['pivot_change_rad'] },
    read: (r, i) => r.commanded?.fingers[i]?.pivot?.change ?? Number.NaN,
  },
  {
    id: 'commanded.pivot.rate', label: 'steered pivot: rate of that change over one time step', tableLabel: 'pivot rate over the time step', unit: 'rad/s',
    display: shown('rad/s'), frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['pivot_rate_rad_s'] },
    read: (r, i) => r.commanded?.fingers[i]?.pivot?.rate ?? Number.NaN,
  },
  {
    id: 'full.rates', label: 'joint rate (full)', tableLabel: 'full', unit: 'rad/s', display: shown('rad/s'), frame: null, scope: 'joint', parts: 'joints',
    compared: true, csv: { perJoint: (k) => `full_rate${k + 1}_rad_s` }, read: (r, i) => r.fingers[i].full.rates,
  },
  {
    id: 'full.residual', label: 'slip residual (full)', tableLabel: 'full: slip residual', unit: 'm/s', display: shown('mm/s'), frame: null,
    scope: 'finger', parts: 'single', compared: true, csv: { columns: ['residual_m_s'] }, read: (r, i) => r.fingers[i].full.residualNorm,
  },
  {
    id: 'full.singularValues', label: 'singular value', unit: 'm/rad', display: shown('m/rad', 3), frame: null, scope: 'finger',
    parts: 'singular-values', compared: true, csv: { columns: ['sigma1_m_rad', 'sigma2_m_rad', 'sigma3_m_rad'] },
    read: (r, i) => r.fingers[i].full.singularValues,
  },
  {
    id: 'full.conditionNumber', label: 'condition number', unit: '', display: unitless(3), frame: null, scope: 'finger', parts: 'single', compared: true,
    csv: { columns: ['condition_number'] }, read: (r, i) => r.fingers[i].full.conditionNumber,
  },
  {
    id: 'full.rank', label: 'rank of the contact Jacobian', unit: '', display: shown('of 3'), frame: null, scope: 'finger', parts: 'single',
    compared: false, read: (r, i) => r.fingers[i].full.rank,
  },
  {
    id: 'full.rankTolerance', label: 'rank tolerance', unit: 'm/rad', display: shown('m/rad', 2), frame: null, scope: 'finger', parts: 'single',
    compared: false, read: (r, i) => r.fingers[i].full.rankTolerance,
  },
  {
    id: 'full.manipulability', label: 'manipulability', unit: '', display: unitless(3), frame: null, scope: 'finger', parts: 'single', compared: true,
    csv: { columns: ['manipulability'] }, read: (r, i) => r.fingers[i].full.manipulability,
  },
  {
    // Several base joints share the normal velocity by the minimum-norm rule (pseudo-inverse of their row of normal gains).
    id: 'steer.baseRates', label: 'base rate (steer-and-roll, minimum norm)', tableLabel: 'steer: base rate', unit: 'rad/s', display: shown('rad/s'),
    frame: null, scope: 'finger', parts: 'base-joints', compared: true, csv: { perJoint: (k) => `steer_base_rate${k + 1}_rad_s` },
    read: (r, i) => r.fingers[i].steer.baseRates,
  },
  {
    id: 'steer.pivotAngle', label: 'pivot angle (steer-and-roll)', tableLabel: 'steer: pivot angle', unit: 'rad', display: shown('deg'),
    frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['steer_pivot_angle_rad'] },
    read: (r, i) => r.fingers[i].steer.pivotAngle,
  },
  {
    id: 'steer.rollRate', label: 'roll rate (steer-and-roll)', tableLabel: 'steer: roll rate', unit: 'rad/s', display: shown('rad/s'), frame: null,
    scope: 'finger', parts: 'single', compared: true, csv: { columns: ['steer_roll_rate_rad_s'] }, read: (r, i) => r.fingers[i].steer.rollRate,
  },
  {
    id: 'steer.residual', label: 'slip residual (steer-and-roll)', unit: 'm/s', display: shown('mm/s'), frame: null, scope: 'finger',
    parts: 'single', compared: true, csv: { columns: ['steer_residual_m_s'] }, read: (r, i) => r.fingers[i].steer.residualNorm,
  },
  {
    id: 'contact.tangentialVelocity', label: 'tangential velocity', unit: 'm/s', display: shown('mm/s'), frame: 'palm', scope: 'finger',
    parts: 'xyz', compared: false, read: (r, i) => r.fingers[i].contact.tangentialVelocity,
  },
  {
    id: 'steer.rateDifferenceNorm', label: 'steer − full, |Δ rates|', unit: 'rad/s', display: shown('rad/s'), frame: null, scope: 'finger',
    parts: 'single', compared: false, read: (r, i) => r.fingers[i].steer.rateDifferenceNorm,
  },
  {
    id: 'steer.conditionBefore', label: 'condition before steering', unit: '', display: shown('1', 3), frame: null, scope: 'finger',
    parts: 'single', compared: false, read: (r, i) => r.fingers[i].steer.conditionBefore,
  },
  {
    id: 'steer.conditionAfter', label: 'condition after steering', unit: '', display: shown('1', 3), frame: null, scope: 'finger',
    parts: 'single', compared: false, read: (r, i) => r.fingers[i].steer.conditionAfter,
  },
  {
    id: 'steer.driveSingularValues', label: 'singular value of the drive columns', unit: 'm/rad', display: shown('m/rad', 3), frame: null,
    scope: 'finger', parts: 'singular-values', compared: false, read: (r, i) => r.fingers[i].steer.driveSingularValues,
  },
  {
    id: 'driveRank', label: 'rank of the drive columns', unit: '', display: shown('of 3'), frame: null, scope: 'finger', parts: 'single',
    compared: false, read: (r, i) => r.fingers[i].driveRank,
  },
  {
    id: 'jointAngles', label: 'joint angle', tableLabel: 'angle', unit: 'rad', display: shown('deg'), frame: null, scope: 'joint',
    parts: 'joints', compared: false, read: (r, i) => r.fingers[i].jointAngles,
  },
  {
    id: 'steer.rates', label: 'joint rate (steer-and-roll)', tableLabel: 'steer-and-roll', unit: 'rad/s', display: shown('rad/s'), frame: null,
    scope: 'joint', parts: 'joints', compared: false, read: (r, i) => r.fingers[i].steer.rates,
  },
  {
    id: 'steer.rateDifference', label: 'joint rate difference (steer-and-roll − full)', tableLabel: 'difference', unit: 'rad/s', display: shown('rad/s'),
    frame: null, scope: 'joint', parts: 'joints', compared: false, read: (r, i) => r.fingers[i].steer.rateDifference,
  },
  {
    id: 'acceleration.objectPoint', label: 'object acceleration at the contact', tableLabel: 'object acceleration a(x)', unit: 'm/s^2',
    display: shown('m/s²'), frame: 'palm', scope: 'finger', parts: 'xyz', compared: true, read: (r, i) => accelerationOf(r, i, 'objectPoint'),
  },
  {
    id: 'acceleration.centripetal', label: 'centripetal part ω × (ω × r)', tableLabel: 'of which centripetal', unit: 'm/s^2', display: shown('m/s²'),
    frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => accelerationOf(r, i, 'centripetal'),
  },
  {
    id: 'acceleration.jacobianRate', label: 'roller point acceleration at zero joint acceleration (J̇ q̇)', tableLabel: 'J̇ q̇', unit: 'm/s^2',
    display: shown('m/s²'), frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => accelerationOf(r, i, 'jacobianRate'),
  },
  {
    id: 'acceleration.model', label: 'feed-forward contact model', tableLabel: 'contact model', unit: '', display: unitless(), frame: null,
    scope: 'finger', parts: 'single', compared: true, read: (r, i) => r.fingers[i].acceleration?.model ?? 'not computed',
  },
  {
    id: 'acceleration.rollingTerm', label: 'rolling term ω_o × u_o − ω_f × u_f', tableLabel: 'rolling term', unit: 'm/s^2', display: shown('m/s²'),
    frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => accelerationOf(r, i, 'rollingTerm'),
  },
  {
    id: 'acceleration.residual', label: 'acceleration residual (full)', tableLabel: 'acceleration residual', unit: 'm/s^2', display: shown('m/s²'),
    frame: null, scope: 'finger', parts: 'single', compared: true, read: (r, i) => r.fingers[i].acceleration?.residualNorm ?? Number.NaN,
  },
  {
    id: 'acceleration.jointAccelerations', label: 'joint acceleration (full)', tableLabel: 'accel., rad/s²', unit: 'rad/s^2', display: shown('rad/s²'),
    frame: null, scope: 'joint', parts: 'joints', compared: true, read: (r, i) => accelerationOf(r, i, 'jointAccelerations'),
  },
  {
    id: 'acceleration.steer.status', label: 'steer-and-roll feed-forward', tableLabel: 'steer: feed-forward', unit: '', display: unitless(), frame: null,
    scope: 'finger', parts: 'single', compared: true, csv: { columns: ['steer_feedforward'] },
    read: (r, i) => r.fingers[i].acceleration?.steer.status ?? 'not computed',
  },
  {
    id: 'acceleration.steer.pivotRate', label: 'pivot rate (steer-and-roll)', tableLabel: 'steer: pivot rate', unit: 'rad/s', display: shown('rad/s'),
    frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['steer_pivot_rate_rad_s'] },
    read: (r, i) => r.fingers[i].acceleration?.steer.pivotRate ?? Number.NaN,
  },
  {
    id: 'acceleration.steer.rollAcceleration', label: 'roll acceleration (steer-and-roll)', tableLabel: 'steer: roll acceleration', unit: 'rad/s^2',
    display: shown('rad/s²'), frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['steer_roll_acceleration_rad_s2'] },
    read: (r, i) => r.fingers[i].acceleration?.steer.rollAcceleration ?? Number.NaN,
  },
  {
    id: 'acceleration.steer.baseAccelerations', label: 'base acceleration (steer-and-roll, minimum norm)', tableLabel: 'steer: base acceleration',
    unit: 'rad/s^2', display: shown('rad/s²'), frame: null, scope: 'finger', parts: 'base-joints', compared: true,
    csv: { perJoint: (k) => `steer_base_acceleration${k + 1}_rad_s2` },
    read: (r, i) => r.fingers[i].acceleration?.steer.baseAccelerations ?? r.fingers[i].steer.baseJoints.map(() => Number.NaN),
  },
  {
    id: 'acceleration.steer.jointAccelerations', label: 'joint acceleration (steer-and-roll)', tableLabel: 'steer accel., rad/s²', unit: 'rad/s^2',
    display: shown('rad/s²'), frame: null, scope: 'joint', parts: 'joints', compared: false, read: steerJointAccelerations,
  },
  {
    id: 'curvature.object', label: 'object principal curvature', tableLabel: 'object κ1, κ2', unit: '1/m', display: shown('1/m'), frame: null,
    scope: 'finger', parts: 'principal', compared: true, csv: { columns: ['object_kappa1_1_m', 'object_kappa2_1_m'] },
    read: (r, i) => principal(r.fingers[i].curvature?.object.principalCurvatures),
  },
  {
    id: 'curvature.roller', label: 'roller principal curvature', tableLabel: 'roller κ1, κ2', unit: '1/m', display: shown('1/m'), frame: null,
    scope: 'finger', parts: 'principal', compared: true, csv: { columns: ['roller_kappa1_1_m', 'roller_kappa2_1_m'] },
    read: (r, i) => principal(r.fingers[i].curvature?.roller.principalCurvatures),
  },
  {
    id: 'curvature.relative', label: 'relative curvature', tableLabel: 'relative κ1, κ2', unit: '1/m', display: shown('1/m'), frame: null,
    scope: 'finger', parts: 'principal', compared: true, csv: { columns: ['relative_kappa1_1_m', 'relative_kappa2_1_m'] },
    read: (r, i) => principal(r.fingers[i].curvature?.relative.principalCurvatures),
  },
  {
    id: 'curvature.wander.status', label: 'contact-point motion', unit: '', display: unitless(), frame: null, scope: 'finger', parts: 'single',
    compared: true, csv: { columns: ['wander_status'] }, read: (r, i) => r.fingers[i].curvature?.wander.status ?? 'not computed',
  },
  {
    id: 'curvature.wander.rollerSpeed', label: 'contact-point speed over the roller', tableLabel: 'speed over the roller', unit: 'm/s',
    display: shown('mm/s'), frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['wander_roller_m_s'] },
    read: (r, i) => r.fingers[i].curvature?.wander.rollerSpeed ?? Number.NaN,
  },
  {
    id: 'curvature.wander.objectSpeed', label: 'contact-point speed over the object', tableLabel: 'speed over the object', unit: 'm/s',
    display: shown('mm/s'), frame: null, scope: 'finger', parts: 'single', compared: true, csv: { columns: ['wander_object_m_s'] },
    read: (r, i) => r.fingers[i].curvature?.wander.objectSpeed ?? Number.NaN,
  },
  {
    id: 'curvature.object.region', label: 'object surface at the contact', tableLabel: 'object surface', unit: '', display: unitless(), frame: null,
    scope: 'finger', parts: 'single', compared: false, read: (r, i) => r.fingers[i].curvature?.object.region ?? 'not computed',
  },
  {
    id: 'curvature.roller.region', label: 'roller surface at the contact', tableLabel: 'roller surface', unit: '', display: unitless(), frame: null,
    scope: 'finger', parts: 'single', compared: false, read: (r, i) => r.fingers[i].curvature?.roller.region ?? 'not computed',
  },
  {
    id: 'curvature.object.direction', label: 'object direction of κ1', tableLabel: 'object κ1 direction', unit: '', display: shown('1', 3),
    frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => vector(r.fingers[i].curvature?.object.principalDirections?.[0]),
  },
  {
    id: 'curvature.roller.direction', label: 'roller direction of κ1', tableLabel: 'roller κ1 direction', unit: '', display: shown('1', 3),
    frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => vector(r.fingers[i].curvature?.roller.principalDirections?.[0]),
  },
  {
    id: 'curvature.relative.direction', label: 'relative direction of κ1', tableLabel: 'relative κ1 direction', unit: '', display: shown('1', 3),
    frame: 'palm', scope: 'finger', parts: 'xyz', compared: false, read: (r, i) => vector(r.fingers[i].curvature?.relative.principalDirections?.[0]),
  },
  {
    id: 'curvature.wander.rollerVelocity', label: 'contact-point velocity over the roller', tableLabel: 'velocity over the roller', unit: 'm/s',
    display: shown('mm/s'), frame: 'palm', scope: 'finger', parts: 'xyz', compared: false,
    read: (r, i) => vector(r.fingers[i].curvature?.wander.rollerVelocity),
  },
  {
    id: 'curvature.wander.objectVelocity', label: 'contact-point velocity over the object', tableLabel: 'velocity over the object', unit: 'm/s',
    display: shown('mm/s'), frame: 'palm', scope: 'finger', parts: 'xyz', compared: false,
    read: (r, i) => vector(r.fingers[i].curvature?.wander.objectVelocity),
  },
  {
    id: 'grasp.contacts', label: 'contacts', unit: '', display: unitless(), frame: null, scope: 'grasp', parts: 'single', compared: false,
    read: (r) => r.grasp.contactCount,
  },
  {
    id: 'grasp.rank', label: 'grasp map rank', tableLabel: 'rank of the contact map', unit: '', display: shown('of 6'), frame: null, scope: 'grasp',
    parts: 'single', compared: true, read: (r) => r.grasp.rank,
  },
  {
    id: 'grasp.singularValues', label: 'grasp map singular value (1 for translations, m for rotations)', unit: '', display: unitless(3), frame: null, scope: 'grasp',
    parts: 'singular-values', compared: false, read: (r) => r.grasp.singularValues,
  },
  {
    id: 'grasp.undrivable', label: 'undrivable object directions', tableLabel: 'undrivable directions', unit: '', display: unitless(), frame: null,
    scope: 'grasp', parts: 'single', compared: true, read: (r) => r.grasp.undrivableCount,
  },
  {
    id: 'grasp.forceClosure', label: 'force closure (with friction)', tableLabel: 'force closure', unit: '', display: unitless(), frame: null,
    scope: 'grasp', parts: 'single', compared: true, read: (r) => (r.graspQuality ? (r.graspQuality.forceClosure ? 'yes' : 'no') : '—'),
  },
  {
    id: 'grasp.sumQuality', label: 'grasp quality Q_L1 (Ferrari-Canny, sum of normal forces)', tableLabel: 'quality Q_L1', unit: '', display: unitless(3),
    frame: null, scope: 'grasp', parts: 'single', compared: true, read: (r) => r.graspQuality?.sumQuality ?? Number.NaN,
  },
  {
    id: 'grasp.maxQuality', label: 'grasp quality Q_Linf (Ferrari-Canny, largest normal force)', tableLabel: 'quality Q_Linf', unit: '',
    display: unitless(3), frame: null, scope: 'grasp', parts: 'single', compared: true,
    read: (r) => (r.graspQuality ? (r.graspQuality.maxQuality ?? 'not computed: too many contact wrench combinations') : Number.NaN),
  },
  {
    id: 'grasp.weakest', label: 'weakest external wrench', tableLabel: 'weakest direction', unit: '', display: unitless(), frame: null, scope: 'grasp',
    parts: 'single', compared: true, read: (r) => r.graspQuality?.weakestWords ?? '—',
  },
];

const BY_ID = new Map(OUTPUTS.map((output) => [output.id, output]));

/** The catalogue entry with this id; throws on an unknown id, which is a programming error. */
export function findOutput(id: string): OutputDefinition {
  const found = BY_ID.get(id);
  if (!found) throw new Error(`no output "${id}" in the catalogue`);
  return found;
}

/**
 * A number as the editor shows it: significant digits, "—" for NaN, ∞ symbols, and no negative zero.
 * Magnitudes from 1e6 up or below 1e-4 read in exponent form (-8.226e6, 1.432e-6), so a narrow column never fills with digits.
 */
export function formatShownNumber(x: number, digits = 4): string {
  if (Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  // Judged after rounding, so 999999.7 (shown as 1e6) takes the same form as 1e6 itself.
  const rounded = Number(x.toPrecision(digits));
  const magnitude = Math.abs(rounded);
  if (magnitude >= 1e6 || (magnitude > 0 && magnitude < 1e-4)) return rounded.toExponential(digits - 1).replace(/\.?0+e/, 'e').replace('e+', 'e');
  return String(Object.is(rounded, -0) ? 0 : rounded);
}

/** The unit an output is shown in under the sheet's display units. */
export function displayUnit(definition: OutputDefinition, units: DisplayUnits = DEFAULT_DISPLAY_UNITS): string {
  return shownUnit(definition.unit, units, definition.display.unit);
}

/** One SI number of an output in its display unit, as text. */
export function displayNumber(definition: OutputDefinition, si: number, units: DisplayUnits = DEFAULT_DISPLAY_UNITS): string {
  return formatShownNumber(toShown(si, definition.unit, units), definition.display.digits);
}

/** An output's value in its display unit, as text: vectors in parentheses, text as it is. */
export function displayValue(definition: OutputDefinition, value: OutputValue | readonly number[], units: DisplayUnits = DEFAULT_DISPLAY_UNITS): string {
  if (typeof value === 'string') return value;
  if (typeof value === 'number') return displayNumber(definition, value, units);
  // The usual finger has one base joint: its rate reads as a number, not as a one-entry vector.
  if (definition.parts === 'base-joints' && value.length === 1) return displayNumber(definition, value[0]!, units);
  return `(${value.map((x) => displayNumber(definition, x, units)).join(', ')})`;
}

const XYZ = ['x', 'y', 'z'];

function partName(definition: OutputDefinition, result: PlainSheetResult, finger: number, part: number): string {
  switch (definition.parts) {
    case 'single':
      return '';
    case 'xyz':
      return XYZ[part] ?? String(part);
    case 'joints':
      return result.fingers[finger].jointNames[part] ?? `joint ${part + 1}`;
    case 'base-joints':
      return result.fingers[finger].jointNames[result.fingers[finger].steer.baseJoints[part]] ?? `base joint ${part + 1}`;
    case 'singular-values':
      return `σ${part + 1}`;
    case 'principal':
      return `κ${part + 1}`;
  }
}

/** One reported output value of a result: the finger (or "grasp"), what it is, its SI unit and value. */
export interface OutputValueRow {
  group: string;
  quantity: string;
  unit: string;
  value: OutputValue;
}

function valueRows(definition: OutputDefinition, result: PlainSheetResult, finger: number, group: string): OutputValueRow[] {
  const value = definition.read(result, finger);
  const parts: [string, OutputValue][] = typeof value === 'object' ? value.map((v, k) => [partName(definition, result, finger, k), v]) : [['', value]];
  const label = labelWithFrame(definition);
  return parts.map(([part, v]) => ({ group, quantity: part ? `${label} · ${part}` : label, unit: definition.unit, value: v }));
}

/** The compared outputs of one finger, part by part (e.g. "contact point · x"), in catalogue order. */
export function fingerOutputs(result: PlainSheetResult, finger: number): OutputValueRow[] {
  const name = result.fingers[finger].name;
  return OUTPUTS.filter((o) => o.compared && o.scope !== 'grasp').flatMap((o) => valueRows(o, result, finger, name));
}

/** The compared outputs of the grasp, in catalogue order. */
export function graspOutputs(result: PlainSheetResult): OutputValueRow[] {
  return OUTPUTS.filter((o) => o.compared && o.scope === 'grasp').flatMap((o) => valueRows(o, result, -1, 'grasp'));
}

/** The main outputs of a result, finger by finger and then the grasp, in the order a reader checks them. */
export function listOutputs(result: PlainSheetResult): OutputValueRow[] {
  return [...result.fingers.flatMap((_, i) => fingerOutputs(result, i)), ...graspOutputs(result)];
}

/**
 * A number or vector in SI (`siUnit`) as text in the sheet's display units with its unit, e.g. "(12, 0, 3.5) mm"; a ratio ("1" or "")
 * is shown bare. The derivation's values read through it, its formulas stay in SI.
 */
export function formatShownQuantity(value: number | readonly number[], siUnit: string, units: DisplayUnits = DEFAULT_DISPLAY_UNITS, digits = 4): string {
  const number = (x: number) => formatShownNumber(toShown(x, siUnit, units), digits);
  const text = typeof value === 'number' ? number(value) : `(${value.map(number).join(', ')})`;
  return siUnit === '1' || siUnit === '' ? text : `${text} ${shownUnit(siUnit, units)}`;
}
