/**
 * Plot-ready columns from runs and sweeps: one plain typed array per plotted line, so the worker
 * can hand them over without copying and the charts can use them as they are.
 */
import {
  ROTATION_METRICS, SEVERITY_LEVELS, SOLUTION_KINDS, WARNING_CATALOGUE, WARNING_CODES,
  type RunRecord, type RunStopReason, type SweepRecord, type WarningCode, type WarningSeverity,
} from '../kinematics';
import { describeCommanded, sweptCommandedRates } from '../sheet/commanded';
import { followedSlip, runExportTable, sweepExportTable, type ExportTable } from '../sheet/run-export';
import { commandedSolutionOf } from '../sheet/sheet-constants';
import type { CommandedSolution, RunSettings, SheetDocument } from '../sheet/types';

export interface JointSeries {
  finger: string;
  joint: string;
  values: Float64Array;
}

export interface WarningOccurrence {
  code: WarningCode;
  severity: WarningSeverity;
  title: string;
  /** Indices (ticks or sweep steps) at which the warning was raised; a typed array, so the worker hands it over without copying. */
  indices: Uint32Array;
}

export interface RunSeries {
  tickCount: number;
  stopReason: RunStopReason;
  settings: RunSettings;
  /** Wall time of the run inside the worker, ms. */
  elapsedMs: number;
  /** The sheet's commanded solution and, in words, the rates the fingers followed. */
  commanded: CommandedSolution;
  followed: string;
  ticks: Float64Array;
  /** Time of each tick from the start of the run, s (the record's own clock: tick × time step). */
  time: Float64Array;
  jointAngles: JointSeries[];
  jointRates: JointSeries[];
  positionError: Float64Array;
  /** One column per Huynh metric, in ROTATION_METRICS order. */
  orientationError: { key: string; name: string; unit: string; values: Float64Array }[];
  /** Index into SEVERITY_LEVELS per tick. */
  worstSeverity: Uint8Array;
  warnings: WarningOccurrence[];
  /** The run as its CSV and JSON exports write it, built beside the plots so the page downloads without solving again. */
  table: ExportTable;
}

export interface SweepFingerSeries {
  finger: string;
  rates: JointSeries[];
  /** σmin/σmax of the columns the rank-loss warning judges (drive columns after steering, else the full Jacobian). */
  rankRatio: Float64Array;
  /** Slip speed (m/s) left by the solution the finger follows at each value. */
  residual: Float64Array;
  gap: Float64Array;
}

export interface SweepSeries {
  path: string;
  elapsedMs: number;
  /** The sheet's commanded solution and, in words, the rates the joint-rate lines plot. */
  commanded: CommandedSolution;
  followed: string;
  values: Float64Array;
  fingers: SweepFingerSeries[];
  worstSeverity: Uint8Array;
  warnings: WarningOccurrence[];
  /** The sweep as its CSV and JSON exports write it. */
  table: ExportTable;
}

/** Column k of a row-major table with `width` entries per row and `rows` rows. */
export function column(table: ArrayLike<number>, width: number, k: number, rows: number): Float64Array {
  const out = new Float64Array(rows);
  for (let i = 0; i < rows; i++) out[i] = table[i * width + k]!;
  return out;
}

const STOP_REASON_TEXT: Record<RunStopReason, string> = {
  converged: 'Converged: the object reached the target pose within the position and angle tolerances.',
  'tick-limit': 'Stopped at the run\'s most time steps before reaching the target pose.',
  singular: 'Stopped early: a singular warning was raised and the run is set to stop on singular.',
};

/** The stop reason in words. */
export function describeStopReason(reason: RunStopReason): string {
  return STOP_REASON_TEXT[reason];
}

function jointColumns(doc: SheetDocument, columns: ArrayLike<number>[], rows: number): JointSeries[] {
  return doc.hand.fingers.flatMap((finger, f) =>
    finger.joints.map((joint, k) => ({ finger: finger.name, joint: joint.name, values: column(columns[f]!, finger.joints.length, k, rows) })),
  );
}

/** Plot columns of a run record (de-interleaved per joint and per metric) with the ticks at which each warning code was raised. */
export function runSeries(doc: SheetDocument, record: RunRecord, elapsedMs: number): RunSeries {
  const n = record.tickCount;
  const ticks = new Float64Array(n);
  for (let i = 0; i < n; i++) ticks[i] = i;
  const warnings: WarningOccurrence[] = [];
  WARNING_CODES.forEach((code, bit) => {
    let raised = 0;
    for (let i = 0; i < n; i++) if ((record.warningMask[i]! & (1 << bit)) !== 0) raised++;
    if (raised === 0) return;
    const indices = new Uint32Array(raised);
    for (let i = 0, k = 0; i < n; i++) if ((record.warningMask[i]! & (1 << bit)) !== 0) indices[k++] = i;
    warnings.push({ code, severity: WARNING_CATALOGUE[code].severity, title: WARNING_CATALOGUE[code].title, indices });
  });
  const commanded = commandedSolutionOf(doc);
  // What each finger followed at the first tick (its joint roles decide, and they do not change); a run of no ticks reads as the choice.
  const followed = record.fingerNames.map((finger, f) => ({ finger, solution: n === 0 ? commanded : SOLUTION_KINDS[record.solution[f]!]! }));
  return {
    tickCount: n,
    stopReason: record.stopReason,
    settings: record.settings,
    elapsedMs,
    commanded,
    followed: describeCommanded(commanded, followed),
    ticks,
    time: record.time.slice(0, n),
    jointAngles: jointColumns(doc, record.jointAngles, n),
    jointRates: jointColumns(doc, record.jointRates, n),
    positionError: record.positionError.slice(),
    orientationError: ROTATION_METRICS.map((metric, k) => ({
      key: metric.key,
      name: metric.name,
      unit: metric.unit,
      values: column(record.orientationError, ROTATION_METRICS.length, k, n),
    })),
    worstSeverity: record.worstSeverity.slice(),
    warnings,
    table: runExportTable(doc, record),
  };
}

const SEVERITY_INDEX = new Map(SEVERITY_LEVELS.map((level, i) => [level, i]));

/** Plot columns of a sweep: per finger its joint rates, the rank-loss ratio its warning judges, the slip left and the gap over the swept value, and where each warning appeared. */
export function sweepSeries(doc: SheetDocument, record: SweepRecord, elapsedMs: number): SweepSeries {
  const steps = record.results.length;
  const commanded = record.results.map((result, i) => sweptCommandedRates(doc, result, record.path, record.values[i]!));
  const fingers = doc.hand.fingers.map((finger, f): SweepFingerSeries => {
    const rates = finger.joints.map((joint, k) => ({
      finger: finger.name,
      joint: joint.name,
      values: Float64Array.from(commanded, (rates) => rates.fingers[f]!.joints[k]!.rate),
    }));
    return {
      finger: finger.name,
      rates,
      rankRatio: Float64Array.from(record.results, (result) => result.fingers[f]!.rankRatio),
      residual: Float64Array.from(record.results, (result, i) => followedSlip(result, f, commanded[i]!.fingers[f]!.solution)),
      gap: Float64Array.from(record.results, (result) => result.fingers[f]!.contact.gap),
    };
  });
  const byCode = new Map<WarningCode, number[]>();
  record.results.forEach((result, i) => {
    for (const warning of result.warnings) {
      const indices = byCode.get(warning.code) ?? [];
      if (indices[indices.length - 1] !== i) indices.push(i);
      byCode.set(warning.code, indices);
    }
  });
  const warnings = WARNING_CODES.filter((code) => byCode.has(code)).map((code) => ({
    code,
    severity: WARNING_CATALOGUE[code].severity,
    title: WARNING_CATALOGUE[code].title,
    indices: Uint32Array.from(byCode.get(code)!),
  }));
  const worstSeverity = new Uint8Array(steps);
  record.worstSeverity.forEach((level, i) => (worstSeverity[i] = SEVERITY_INDEX.get(level)!));
  const chosen = commandedSolutionOf(doc);
  // Whether a finger can steer depends on its joint roles, which a sweep of a number never changes: the first value tells.
  return {
    path: record.path, elapsedMs, commanded: chosen, followed: describeCommanded(chosen, commanded[0]?.fingers ?? []), values: record.values.slice(), fingers,
    worstSeverity, warnings, table: sweepExportTable(doc, record),
  };
}

/** Stretches of equal, non-zero severity: [start, end) index ranges with their SEVERITY_LEVELS index. */
export function severityRuns(levels: ArrayLike<number>): { start: number; end: number; level: number }[] {
  const runs: { start: number; end: number; level: number }[] = [];
  for (let i = 0; i < levels.length; ) {
    const level = levels[i]!;
    let j = i + 1;
    while (j < levels.length && levels[j] === level) j++;
    if (level !== 0) runs.push({ start: i, end: j, level });
    i = j;
  }
  return runs;
}

/** Every ArrayBuffer behind a series, for postMessage's transfer list (each listed once). */
export function transferablesOf(series: RunSeries | SweepSeries): ArrayBuffer[] {
  const buffers = new Set<ArrayBuffer>();
  const visit = (value: unknown) => {
    if (ArrayBuffer.isView(value)) buffers.add(value.buffer as ArrayBuffer);
    else if (Array.isArray(value)) value.forEach(visit);
    else if (value !== null && typeof value === 'object') Object.values(value).forEach(visit);
  };
  visit(series);
  return [...buffers];
}
