/**
 * The comparison of a controller log with a sheet, streamed sample by sample. At each sample the
 * sheet is re-solved at the logged object pose and joint angles (unmapped joints keep the sheet's
 * angles) and:
 * 1. the rates the sheet would command there, by the run's law: the twist gain * pose error toward
 *    motion.target (the logged wanted twist when mapped), solved as the sheet's runs solve it
 *    (under the commanded solution "steer-and-roll", steer-and-roll for fingers with base, pivot
 *    and roll joints, whose pivot rate is the pivot change over the interval to the next sample;
 *    the full damped least-squares rates under "full" and for other fingers), are compared with
 *    the logged commanded rates;
 * 2. the slip the logged motion implies: the object twist by finite differences of the logged
 *    poses (see differentiate.ts) gives the object's material velocity at each contact, the logged
 *    measured joint rates give the roller's through the contact Jacobian at the logged angles
 *    (rolling without slipping makes the two equal; under steer-and-roll the pivot's logged turn
 *    steers the joints after it instead of rolling), and the slip speed is the tangential part of
 *    their difference less the slip the sheet's own solution leaves there (the normal part opens
 *    or presses the contact and is not slip).
 * The sample is handled once its successor is read, because the central difference needs it.
 */
import {
  createMatrix, createResult, createScene, quat, solveScene, steeredColumns, WARNING_CATALOGUE, WARNING_CODES, type Matrix, type Scene, type SheetResult,
  type WarningCode,
} from '../kinematics';
import { fail, succeed, type DomainError, type Result } from '../result';
import type { CommandedSolution, SheetDocument } from '../sheet/types';
import { twistBetween } from './differentiate';
import type { LogMapping } from './mapping';
import { readLog, type LogGap, type LogIssue, type LogSample, type LogSource } from './read-log';
import {
  addResidual, addToDecimator, breakInterval, createAccumulator, createDecimator, finishAccumulator, finishDecimator,
  type DecimatedSeries, type ResidualStatistics,
} from './statistics';

/** Buckets of the decimated plot series (each keeps its smallest and largest value). */
export const PLOT_BUCKETS = 2000;
/** Gaps listed in a comparison; more are counted. */
export const MAX_LISTED_GAPS = 100;

/** Warnings by which the sheet's own solution leaves slip at a contact: the comparison judges only slip beyond it. */
const SHEET_SLIP_WARNINGS: ReadonlySet<WarningCode> = new Set(['SLIP_REQUIRED', 'STEER_CANNOT_ALIGN']);

/** Where a mapped joint sits in the sheet. */
export interface MappedJoint {
  joint: string;
  finger: number;
  index: number;
}

/** The comparison of one joint's logged commanded rate with the sheet's (rad/s): residual = logged - sheet. */
export interface JointComparison extends ResidualStatistics {
  joint: string;
  finger: string;
}

/** The slip at one finger's contact (m/s); `reason` says why it was not computed. */
export interface ContactSlip extends ResidualStatistics {
  finger: string;
  computed: boolean;
  reason?: string;
  /** Samples at which the roller was separated from the object (no slip judged). */
  separatedSamples: number;
}

/** Times (s) during which a warning of the re-solved sheet was raised. */
export interface WarningActivity {
  code: WarningCode;
  severity: string;
  samples: number;
  intervals: { from: number; to: number }[];
  intervalsOmitted: number;
}

export interface LogComparison {
  /** The sheet's commanded solution the sheet's rates follow; absent from comparisons stored before the choice existed, which followed steer-and-roll. */
  solution?: CommandedSolution;
  samples: number;
  /** Time of the first and last sample, s. */
  from: number;
  to: number;
  /** Tolerances judged by: joint rate (rad/s) and slip speed (m/s). */
  tolerances: { rate: number; slip: number };
  joints: JointComparison[];
  contacts: ContactSlip[];
  warnings: WarningActivity[];
  gaps: LogGap[];
  gapCount: number;
  verdict: { withinTolerance: boolean; reasons: string[] };
  /** Decimated series for plots (per compared joint: logged, sheet, residual; per contact: slip; then the worst warning rank). */
  series: DecimatedSeries;
}

/** One compared sample, for the per-sample table: per compared joint logged, sheet and residual rates (rad/s); per finger slip speed (m/s, NaN when not judged). */
export interface ComparedSample {
  line: number;
  time: number;
  logged: Float64Array;
  sheet: Float64Array;
  residual: Float64Array;
  slip: Float64Array;
  warnings: WarningCode[];
}

export interface LogComparisonError extends DomainError {
  kind: 'invalid';
  /** "mapping" when the mapping does not fit the sheet, "log" when the log is bad. */
  stage: 'mapping' | 'log';
  issues: (LogIssue | { path: string; message: string })[];
}

export interface CompareOptions {
  /** Called with each compared sample in time order (the object is reused for the next sample). */
  onSample?: (sample: ComparedSample) => void;
  /** Called once the header is read and the table's columns are known: the compared joints, the solution each one's sheet rate follows, the fingers. */
  onColumns?: (columns: { joints: string[]; solutions: CommandedSolution[]; fingers: string[] }) => void;
  plotBuckets?: number;
  /** Reads the log: readLog (one thread, any source) unless a caller in Node passes readLogThreaded. */
  read?: typeof readLog;
}

/** Where each mapped joint sits in the sheet, or the issues naming joints the sheet does not have. */
export function resolveMappedJoints(doc: SheetDocument, mapping: LogMapping): Result<MappedJoint[], LogComparisonError> {
  const where = new Map<string, { finger: number; index: number }>();
  doc.hand.fingers.forEach((finger, f) => finger.joints.forEach((joint, index) => where.set(joint.name, { finger: f, index })));
  const issues: { path: string; message: string }[] = [];
  const resolved: MappedJoint[] = [];
  mapping.joints.forEach((entry, i) => {
    const at = where.get(entry.joint);
    if (at) resolved.push({ joint: entry.joint, ...at });
    else issues.push({ path: `joints[${i}].joint`, message: `the sheet has no joint named "${entry.joint}" (its joints: ${[...where.keys()].join(', ')})` });
  });
  if (issues.length > 0) return fail({ kind: 'invalid', stage: 'mapping', message: issues[0]!.message, issues });
  return succeed(resolved);
}

const number = (value: number, digits = 4) => Number(value.toPrecision(digits)).toString();

/** The verdict in words: within tolerance when every compared joint and every judged contact stays within its tolerance. */
function verdictOf(joints: JointComparison[], contacts: ContactSlip[], warnings: WarningActivity[], tolerances: LogComparison['tolerances']): LogComparison['verdict'] {
  const reasons: string[] = [];
  let within = true;
  for (const j of joints) {
    if (j.max <= tolerances.rate) continue;
    within = false;
    reasons.push(
      `joint "${j.joint}": the logged commanded rate differs from the sheet's by up to ${number(j.max)} rad/s at t = ${number(j.maxAt ?? 0, 6)} s ` +
        `(tolerance ${number(tolerances.rate)} rad/s); ${number(100 * (1 - j.withinFraction), 3)} % of samples outside, in ${j.intervals.length + j.intervalsOmitted} interval(s)`,
    );
  }
  for (const c of contacts) {
    if (!c.computed || c.max <= tolerances.slip) continue;
    within = false;
    reasons.push(
      `contact of finger "${c.finger}": the logged motion slips at up to ${number(c.max * 1000)} mm/s at t = ${number(c.maxAt ?? 0, 6)} s ` +
        `(tolerance ${number(tolerances.slip * 1000)} mm/s), in ${c.intervals.length + c.intervalsOmitted} interval(s)`,
    );
  }
  const judged = joints.length + contacts.filter((c) => c.computed && c.samples > 0).length;
  if (judged === 0) {
    return { withinTolerance: false, reasons: ['nothing could be compared: the mapping names no commanded rates and no finger has measured rates for all its joints'] };
  }
  if (within) {
    if (joints.length > 0) reasons.push(`every compared commanded rate (${joints.length} joint(s)) stays within ${number(tolerances.rate)} rad/s of the sheet's`);
    const slipCount = contacts.filter((c) => c.computed).length;
    if (slipCount > 0) reasons.push(`the slip at every judged contact (${slipCount}) stays under ${number(tolerances.slip * 1000)} mm/s`);
  }
  for (const c of contacts) if (!c.computed) reasons.push(`contact of finger "${c.finger}" not judged: ${c.reason}`);
  for (const w of warnings) {
    if (!SHEET_SLIP_WARNINGS.has(w.code)) continue;
    reasons.push(`the sheet itself requires slip (${w.code}) at ${w.samples} sample(s); slip is judged beyond what the sheet's own solution leaves`);
  }
  return { withinTolerance: within, reasons };
}

interface WarningTracker {
  samples: number;
  open: { from: number; to: number } | null;
  intervals: { from: number; to: number }[];
  omitted: number;
}

/** Compares a log with a sheet, reading the log once as a stream; fails with located issues for a mapping that does not fit or a bad log. */
export async function compareLog(doc: SheetDocument, mapping: LogMapping, source: LogSource, options: CompareOptions = {}): Promise<Result<LogComparison, LogComparisonError>> {
  const resolved = resolveMappedJoints(doc, mapping);
  if (!resolved.ok) return resolved;
  const joints = resolved.value;
  const scene: Scene = createScene(doc);
  const result: SheetResult = createResult(scene);
  const fingers = scene.fingers;
  const fingerNames = fingers.map((f) => f.name);
  const tolerances = { rate: mapping.tolerances.rate, slip: mapping.tolerances.slip };
  const gain = doc.motion.run.gain;
  const targetPosition = Float64Array.from(doc.motion.target.position);
  const targetOrientation = quat.fromSheet(doc.motion.target.orientation, new Float64Array(4));

  const compared = mapping.joints.flatMap((entry, m) => (entry.commandedRate ? [m] : []));
  const measuredJoint = fingers.map((f, fi) => Array.from({ length: f.jointCount }, (_, k) => joints.findIndex((j, m) => j.finger === fi && j.index === k && mapping.joints[m]!.measuredRate !== undefined)));
  const slipJudged = measuredJoint.map((entries) => entries.every((m) => m >= 0));
  const jointStats = compared.map(() => createAccumulator(tolerances.rate));
  const slipStats = fingers.map(() => createAccumulator(tolerances.slip));
  const separated = fingers.map(() => 0);
  const trackers: WarningTracker[] = WARNING_CODES.map(() => ({ samples: 0, open: null, intervals: [], omitted: 0 }));
  const labels = [
    ...compared.flatMap((m) => [`${joints[m]!.joint} logged`, `${joints[m]!.joint} sheet`, `${joints[m]!.joint} residual`]),
    ...fingerNames.map((name) => `${name} slip`),
    'worst warning',
  ];
  const decimator = createDecimator(labels, options.plotBuckets ?? PLOT_BUCKETS);
  const plotValues = new Float64Array(labels.length);
  const row: ComparedSample = {
    line: 0, time: 0,
    logged: new Float64Array(compared.length), sheet: new Float64Array(compared.length), residual: new Float64Array(compared.length),
    slip: new Float64Array(fingers.length), warnings: [],
  };
  const sheetRates = fingers.map((f) => new Float64Array(f.jointCount));
  const turned = fingers.map((f) => createMatrix(3, f.jointCount));
  const pivotTurn = new Float64Array(2);
  /** The finger's translational contact Jacobian with the joints after its pivot turned by `change` (rad) about the pivot line. */
  const turnedJacobian = (f: number, full: Matrix, change: number, rollerPoint: Float64Array): Matrix => {
    const out = turned[f]!, n = out.cols, cols = full.cols;
    for (let i = 0; i < 3; i++) for (let k = 0; k < n; k++) out.data[i * n + k] = full.data[i * cols + k]!;
    pivotTurn[0] = Math.cos(change);
    pivotTurn[1] = Math.sin(change);
    steeredColumns(fingers[f]!, rollerPoint, pivotTurn, out);
    return out;
  };
  const solution: CommandedSolution = doc.commanded ?? 'steer-and-roll';
  const steerChosen = solution === 'steer-and-roll';
  const twist = new Float64Array(6);
  const conjugated = new Float64Array(4), relative = new Float64Array(4), axis = new Float64Array(3);
  const gaps: LogGap[] = [];
  let gapCount = 0;
  let first = NaN, last = NaN, count = 0;
  const unsolved: LogIssue[] = [];
  // Steer-and-roll applies to a finger by its joint roles alone (a base, a pivot and a roll joint), which no sample changes.
  const followed = fingers.map((f): CommandedSolution => (steerChosen && f.roles.includes('base') && f.pivotIndex >= 0 && f.rollIndex >= 0 ? 'steer-and-roll' : 'full'));
  options.onColumns?.({ joints: compared.map((m) => joints[m]!.joint), solutions: compared.map((m) => followed[joints[m]!.finger]!), fingers: fingerNames });

  /** The sheet's commanded twist at the sample: the logged wanted twist, or gain times the pose error toward the target (world frame). */
  const commandTwist = (s: LogSample): void => {
    const object = scene.object;
    if (s.wantedTwist) {
      for (let k = 0; k < 3; k++) {
        object.linearVelocity[k] = s.wantedTwist[k]!;
        object.angularVelocity[k] = s.wantedTwist[3 + k]!;
      }
      return;
    }
    for (let k = 0; k < 3; k++) object.linearVelocity[k] = gain * (targetPosition[k]! - s.position[k]!);
    quat.multiply(targetOrientation, quat.conjugate(s.orientation, conjugated), relative);
    const angle = gain * quat.toAxisAngle(relative, axis);
    for (let k = 0; k < 3; k++) object.angularVelocity[k] = axis[k]! * angle;
  };

  const track = (time: number, mask: number): void => {
    for (let c = 0; c < trackers.length; c++) {
      const t = trackers[c]!;
      if ((mask & (1 << c)) === 0) {
        if (t.open) {
          if (t.intervals.length < 200) t.intervals.push(t.open);
          else t.omitted++;
          t.open = null;
        }
        continue;
      }
      t.samples++;
      if (t.open) t.open.to = time;
      else t.open = { from: time, to: time };
    }
  };

  /** Compares sample `s`, with its neighbours (null at an end or across a gap) for the pose derivative. */
  const compare = (previous: LogSample | null, s: LogSample, next: LogSample | null): void => {
    const object = scene.object;
    for (let k = 0; k < 3; k++) object.position[k] = s.position[k]!;
    for (let k = 0; k < 4; k++) object.orientation[k] = s.orientation[k]!;
    for (let m = 0; m < joints.length; m++) {
      const angle = s.angles[m]!;
      if (!Number.isNaN(angle)) fingers[joints[m]!.finger]!.angles[joints[m]!.index] = angle;
    }
    commandTwist(s);
    solveScene(scene, result, 'run');
    const interval = next ? next.time - s.time : previous ? s.time - previous.time : doc.motion.run.dt;
    for (let f = 0; f < fingers.length; f++) {
      const solved = result.fingers[f]!;
      const rates = sheetRates[f]!;
      // A plain loop: TypedArray.set costs more than the copy for a few joints.
      const steered = steerChosen && solved.steer.available;
      const from = steered ? solved.steer.rates : solved.full.rates;
      for (let k = 0; k < rates.length; k++) rates[k] = from[k]!;
      if (steered) rates[fingers[f]!.pivotIndex] = solved.steer.pivotChange / interval;
    }
    for (let c = 0; c < compared.length; c++) {
      const m = compared[c]!;
      const logged = s.commandedRates[m]!;
      const sheet = sheetRates[joints[m]!.finger]![joints[m]!.index]!;
      row.logged[c] = logged;
      row.sheet[c] = sheet;
      row.residual[c] = logged - sheet;
      plotValues[3 * c] = logged;
      plotValues[3 * c + 1] = sheet;
      plotValues[3 * c + 2] = logged - sheet;
    }
    const haveTwist = previous !== null || next !== null;
    if (haveTwist) {
      const a = previous ?? s, b = next ?? s;
      twistBetween(a.position, a.orientation, a.time, b.position, b.orientation, b.time, twist);
    }
    let finite = true;
    for (let c = 0; c < compared.length; c++) if (!Number.isFinite(row.residual[c]!)) finite = false;
    for (let f = 0; f < fingers.length; f++) {
      row.slip[f] = NaN;
      const contact = result.fingers[f]!.contact;
      if (!slipJudged[f] || !haveTwist) continue;
      if (contact.state === 'separated') {
        separated[f]!++;
        continue;
      }
      const x = contact.objectPoint, n = contact.normal;
      const solved = result.fingers[f]!;
      const entries = measuredJoint[f]!;
      const steered = steerChosen && solved.steer.available;
      const pivot = steered ? fingers[f]!.pivotIndex : -1;
      let jacobian = solved.full.jacobian;
      if (steered) {
        // Under steer-and-roll the pivot turns the roll direction between samples and the roller rolls in the turned
        // direction (as the sheet's runs move it): the pivot's turn over the interval is steering, not rolling.
        const change = s.measuredRates[entries[pivot]!]! * interval;
        if (change !== 0) {
          jacobian = turnedJacobian(f, solved.full.jacobian, change, contact.rollerPoint);
        }
      }
      const cols = jacobian.cols, data = jacobian.data;
      const rx = x[0]! - s.position[0]!, ry = x[1]! - s.position[1]!, rz = x[2]! - s.position[2]!;
      // Object material velocity at x: v + w x (x - p).
      let sx = twist[0]! + twist[4]! * rz - twist[5]! * ry;
      let sy = twist[1]! + twist[5]! * rx - twist[3]! * rz;
      let sz = twist[2]! + twist[3]! * ry - twist[4]! * rx;
      for (let k = 0; k < entries.length; k++) {
        if (k === pivot) continue;
        const rate = s.measuredRates[entries[k]!]!;
        sx -= data[k]! * rate;
        sy -= data[cols + k]! * rate;
        sz -= data[2 * cols + k]! * rate;
      }
      // Less the slip the sheet's own solution leaves at this state (non-zero only where the sheet warns that
      // slip is required): a log that does what the sheet says passes, and the sheet's warning tells of the slip.
      const left = steered ? solved.steer.residual : solved.full.residual;
      sx -= left[0]!; sy -= left[1]!; sz -= left[2]!;
      const along = sx * n[0]! + sy * n[1]! + sz * n[2]!;
      sx -= along * n[0]!; sy -= along * n[1]!; sz -= along * n[2]!;
      const slip = Math.sqrt(sx * sx + sy * sy + sz * sz);
      row.slip[f] = slip;
      if (!Number.isFinite(slip)) finite = false;
    }
    for (let f = 0; f < fingers.length; f++) plotValues[3 * compared.length + f] = row.slip[f]!;
    if (!finite) {
      // A state at which the solve loses its digits is reported at its line, never turned into statistics.
      if (unsolved.length < 50) unsolved.push({ line: s.line, expected: 'a logged state at which the sheet solves to finite rates', found: 'a non-finite rate or slip', message: `line ${s.line}: the sheet does not solve to finite rates at the logged state` });
      return;
    }
    for (let c = 0; c < compared.length; c++) addResidual(jointStats[c]!, s.time, Math.abs(row.residual[c]!));
    for (let f = 0; f < fingers.length; f++) if (!Number.isNaN(row.slip[f]!)) addResidual(slipStats[f]!, s.time, row.slip[f]!);
    const mask = result.warningList.mask;
    plotValues[labels.length - 1] = result.warningList.worstRank;
    track(s.time, mask);
    addToDecimator(decimator, s.time, plotValues);
    if (options.onSample) {
      row.line = s.line;
      row.time = s.time;
      row.warnings = mask === 0 ? [] : WARNING_CODES.filter((_, c) => (mask & (1 << c)) !== 0);
      options.onSample(row);
    }
    if (count === 0) first = s.time;
    last = s.time;
    count++;
  };

  let previous: LogSample | null = null;
  let current: LogSample | null = null;
  const outcome = await (options.read ?? readLog)(source, mapping, {
    onGap: (gap) => {
      if (gaps.length < MAX_LISTED_GAPS) gaps.push(gap);
      gapCount++;
    },
    onSample: (sample) => {
      if (current !== null) {
        if (sample.afterGap) {
          compare(previous, current, null);
          jointStats.forEach(breakInterval);
          slipStats.forEach(breakInterval);
          previous = null;
        } else {
          compare(previous, current, sample);
          previous = current;
        }
      }
      current = sample;
    },
  });
  if (outcome.issues.length > 0) {
    return fail({ kind: 'invalid', stage: 'log', message: outcome.issues[0]!.message, issues: outcome.issues });
  }
  if (current !== null) compare(previous, current, null);
  track(NaN, 0);
  if (unsolved.length > 0) return fail({ kind: 'invalid', stage: 'log', message: unsolved[0]!.message, issues: unsolved });

  const jointResults: JointComparison[] = compared.map((m, c) => ({
    joint: joints[m]!.joint,
    finger: fingerNames[joints[m]!.finger]!,
    ...finishAccumulator(jointStats[c]!),
  }));
  const contacts: ContactSlip[] = fingers.map((f, fi) => {
    const missing = measuredJoint[fi]!.flatMap((m, k) => (m < 0 ? [f.jointNames[k]!] : []));
    return {
      finger: f.name,
      computed: slipJudged[fi]!,
      ...(slipJudged[fi] ? {} : { reason: `no measured rate mapped for joint(s) ${missing.map((name) => `"${name}"`).join(', ')}` }),
      separatedSamples: separated[fi]!,
      ...finishAccumulator(slipStats[fi]!),
    };
  });
  const warnings: WarningActivity[] = WARNING_CODES.flatMap((code, c) => {
    const t = trackers[c]!;
    return t.samples === 0 ? [] : [{ code, severity: WARNING_CATALOGUE[code].severity, samples: t.samples, intervals: t.intervals, intervalsOmitted: t.omitted }];
  });
  return succeed({
    solution,
    samples: count,
    from: first,
    to: last,
    tolerances,
    joints: jointResults,
    contacts,
    warnings,
    gaps,
    gapCount,
    verdict: verdictOf(jointResults, contacts, warnings, tolerances),
    series: finishDecimator(decimator),
  });
}

/** Why a mapping does not fit or a log is bad, one located line per issue. */
export function describeComparisonError(error: LogComparisonError): string[] {
  return error.issues.map((issue) => ('path' in issue ? `mapping: ${issue.path}: ${issue.message}` : issue.message));
}
