/**
 * A sheet's test matrix: every target rotation (listed, then generated) run from every start
 * orientation with the sheet's closed-loop run until it converges (the run's own rule: position
 * and geodesic angle within the tolerances) or fails (tick limit, a singular Jacobian when the run
 * stops on one, or a refusal: the core threw or gave a non-finite error). The final orientation
 * error is reported by the matrix's metric; because every metric of Huynh (2009) is an increasing
 * function of the geodesic angle, "below the angle tolerance" is the same verdict under each, and
 * the threshold is the tolerance written in the chosen metric. Statistics are the mean and sample
 * standard deviation (mathjs std, n - 1) per group label.
 */
import { mean, std } from 'mathjs';
import {
  createScene, quat, randomRotations, ROTATION_METRICS, rotationDistances, runScene, SEVERITY_LEVELS, spreadAxisRotations, WARNING_CODES,
  type RunRecord, type WarningCode, type WarningSeverity,
} from '../kinematics';
import type { MatrixSettings, QuaternionInput, RotationMetricKey, SheetDocument } from './types';

export type MatrixOutcome = 'converged' | 'tick-limit' | 'singular' | 'refused';

/** One run of the matrix: which target from which start, and the absolute orientations (palm frame). */
export interface MatrixCase {
  /** Position in the run order: target-major, start-minor. */
  index: number;
  target: number;
  start: number;
  group: string;
  startLabel: string;
  /** The start orientation and the orientation aimed at (the target rotation applied to the start), palm frame. */
  startOrientation: QuaternionInput;
  targetOrientation: QuaternionInput;
}

export interface MatrixRun extends MatrixCase {
  outcome: MatrixOutcome;
  ticks: number;
  /** Simulated time taken, ticks * dt, s. */
  time: number;
  /** Orientation error at the last tick by the matrix's metric (its unit: rad or 1); null when refused. */
  finalError: number | null;
  /** Position error at the last tick, m; null when refused. */
  finalPositionError: number | null;
  /** Every warning raised on any tick, in catalogue order, and the worst severity seen. */
  warnings: WarningCode[];
  worstSeverity: WarningSeverity | 'none';
  /** Why a run was refused. */
  message?: string;
}

/** Mean and sample standard deviation; sd is null below two values, mean null with none. */
export interface Spread {
  mean: number | null;
  sd: number | null;
}

export interface MatrixGroup {
  group: string;
  runs: number;
  converged: number;
  /** Over the runs that were not refused, in the metric's unit. */
  finalError: Spread;
  /** Over the converged runs only: how long convergence took. */
  ticks: Spread;
  time: Spread;
}

export interface MatrixResult {
  metric: RotationMetricKey;
  metricUnit: 'rad' | '1';
  /** The run's angle tolerance written in the metric: a converged run ends at or below it. */
  threshold: number;
  /** False when a time limit stopped the matrix; runs then holds the finished ones. */
  complete: boolean;
  totalRuns: number;
  runs: MatrixRun[];
  groups: MatrixGroup[];
}

export interface MatrixOptions {
  /** After every finished run, with runs done and the total. */
  onProgress?: (done: number, total: number) => void;
  /** Each finished run with its record (for data sets); the record's columns are reused by nothing else. */
  onRun?: (run: MatrixRun, record: RunRecord) => void;
  /** Stop once this returns true: checked between runs and every 500 ticks inside one. */
  shouldStop?: () => boolean;
}

class MatrixStopped extends Error {}

const degrees = (angle: number) => Number(((angle * 180) / Math.PI).toPrecision(4));

/** Every target rotation with its group: listed targets ("targets" when unlabelled), then each generator's ([x, y, z, w] inside). */
function targetRotations(settings: MatrixSettings): { rotation: number[]; group: string }[] {
  const out = settings.targets.map((t) => ({ rotation: quat.fromSheet(t.orientation), group: t.group ?? 'targets' }));
  for (const generator of settings.generators) {
    const rotations =
      generator.kind === 'spread-axes' ? spreadAxisRotations(generator.count, generator.angle) : randomRotations(generator.count, generator.seed);
    const group = generator.group ?? (generator.kind === 'spread-axes' ? `spread axes, ${degrees(generator.angle)} deg` : `random, seed ${generator.seed}`);
    for (let i = 0; i < generator.count; i++) out.push({ rotation: Array.from(rotations.subarray(4 * i, 4 * i + 4)), group });
  }
  return out;
}

/** The matrix's runs in order: every target from every start (the sheet's object orientation when none is listed). */
export function matrixCases(doc: SheetDocument, settings: MatrixSettings): MatrixCase[] {
  const starts = settings.starts.length > 0 ? settings.starts : [{ orientation: doc.object.pose.orientation, label: 'sheet pose' }];
  const cases: MatrixCase[] = [];
  targetRotations(settings).forEach(({ rotation, group }, target) => {
    starts.forEach((start, s) => {
      const startQuat = quat.fromSheet(start.orientation);
      cases.push({
        index: cases.length,
        target,
        start: s,
        group,
        startLabel: start.label ?? `start ${s + 1}`,
        startOrientation: start.orientation,
        targetOrientation: quat.toSheet(quat.normalize(quat.multiply(rotation, startQuat))),
      });
    });
  });
  return cases;
}

/** The angle tolerance (rad) as a distance by metric: the metric between the identity and a turn by that angle. */
export function metricThreshold(metric: RotationMetricKey, angleTolerance: number): number {
  const index = ROTATION_METRICS.findIndex((m) => m.key === metric);
  return rotationDistances([0, 0, 0, 1], quat.fromAxisAngle([0, 0, 1], angleTolerance), new Float64Array(ROTATION_METRICS.length))[index]!;
}

function spread(values: number[]): Spread {
  if (values.length === 0) return { mean: null, sd: null };
  return { mean: Number(mean(values)), sd: values.length < 2 ? null : Number(std(values)) };
}

/** Mean and sample standard deviation per group label, groups in order of first appearance. */
export function groupStatistics(runs: readonly MatrixRun[]): MatrixGroup[] {
  const byGroup = new Map<string, MatrixRun[]>();
  for (const run of runs) byGroup.set(run.group, [...(byGroup.get(run.group) ?? []), run]);
  return [...byGroup].map(([group, members]) => {
    const converged = members.filter((r) => r.outcome === 'converged');
    return {
      group,
      runs: members.length,
      converged: converged.length,
      finalError: spread(members.flatMap((r) => (r.finalError === null ? [] : [r.finalError]))),
      ticks: spread(converged.map((r) => r.ticks)),
      time: spread(converged.map((r) => r.time)),
    };
  });
}

/** The warnings of a record: every code raised on some tick, and the worst severity. */
function warningsHit(record: RunRecord): { warnings: WarningCode[]; worstSeverity: WarningSeverity | 'none' } {
  let mask = 0;
  let worst = 0;
  for (let k = 0; k < record.tickCount; k++) {
    mask |= record.warningMask[k]!;
    worst = Math.max(worst, record.worstSeverity[k]!);
  }
  return { warnings: WARNING_CODES.filter((_, i) => (mask & (1 << i)) !== 0), worstSeverity: SEVERITY_LEVELS[worst]! };
}

/** One case run to its end; a throw or a non-finite final error is a refusal. */
function runCase(working: SheetDocument, c: MatrixCase, metricIndex: number, options: MatrixOptions): { run: MatrixRun; record?: RunRecord } {
  working.object.pose.orientation = c.startOrientation;
  working.motion.target.orientation = c.targetOrientation;
  const settings = working.motion.run;
  const stop = options.shouldStop;
  let record: RunRecord;
  try {
    record = runScene(createScene(working), settings, stop ? { onProgress: () => { if (stop()) throw new MatrixStopped(); } } : {});
  } catch (error) {
    if (error instanceof MatrixStopped) throw error;
    const message = error instanceof Error ? error.message : String(error);
    return { run: { ...c, outcome: 'refused', ticks: 0, time: 0, finalError: null, finalPositionError: null, warnings: [], worstSeverity: 'none', message } };
  }
  const last = record.tickCount - 1;
  const metricCount = ROTATION_METRICS.length;
  const finalError = last >= 0 ? record.orientationError[metricCount * last + metricIndex]! : NaN;
  const finalPositionError = last >= 0 ? record.positionError[last]! : NaN;
  const hit = warningsHit(record);
  if (!Number.isFinite(finalError) || !Number.isFinite(finalPositionError)) {
    return {
      run: { ...c, outcome: 'refused', ticks: record.tickCount, time: record.tickCount * settings.dt, finalError: null, finalPositionError: null, ...hit, message: 'the run gave a non-finite orientation or position error' },
    };
  }
  return { run: { ...c, outcome: record.stopReason, ticks: record.tickCount, time: record.tickCount * settings.dt, finalError, finalPositionError, ...hit }, record };
}

/** A matrix taken one run at a time, so a caller can yield between runs (the server) or stop (a time limit). */
export interface MatrixStepper {
  cases: MatrixCase[];
  /** Runs case i (in order); false when it was stopped by shouldStop inside the run. */
  step: (i: number) => boolean;
  /** The result of the runs done so far. */
  finish: () => MatrixResult;
}

/** Prepares the document's matrix (or the one given) to run case by case; the document is not modified. */
export function matrixStepper(doc: SheetDocument, settings: MatrixSettings | undefined = doc.matrix, options: MatrixOptions = {}): MatrixStepper {
  if (settings === undefined) throw new RangeError('the sheet has no matrix');
  const working = structuredClone(doc);
  const cases = matrixCases(doc, settings);
  const metricIndex = ROTATION_METRICS.findIndex((m) => m.key === settings.metric);
  const runs: MatrixRun[] = [];
  return {
    cases,
    step: (i) => {
      let outcome;
      try {
        outcome = runCase(working, cases[i]!, metricIndex, options);
      } catch (error) {
        if (error instanceof MatrixStopped) return false;
        throw error;
      }
      runs.push(outcome.run);
      if (outcome.record) options.onRun?.(outcome.run, outcome.record);
      options.onProgress?.(runs.length, cases.length);
      return true;
    },
    finish: () => ({
      metric: settings.metric,
      metricUnit: ROTATION_METRICS[metricIndex]!.unit,
      threshold: metricThreshold(settings.metric, doc.motion.run.angleTolerance),
      complete: runs.length === cases.length,
      totalRuns: cases.length,
      runs: [...runs],
      groups: groupStatistics(runs),
    }),
  };
}

/** Runs the document's matrix (or the one given) to its end or until shouldStop; the document is not modified. */
export function runMatrix(doc: SheetDocument, settings: MatrixSettings | undefined = doc.matrix, options: MatrixOptions = {}): MatrixResult {
  const stepper = matrixStepper(doc, settings, options);
  for (let i = 0; i < stepper.cases.length; i++) {
    if (options.shouldStop?.() || !stepper.step(i)) break;
  }
  return stepper.finish();
}
