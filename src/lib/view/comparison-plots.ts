/**
 * Plot data of a stored comparison, from its decimated series (each bucket keeps its smallest and
 * largest value): every series is drawn as its envelope, x = [from, to] per bucket with y = [min,
 * max], so a spike in a 100,000-sample log still reaches its height in 2,000 buckets. Tolerance
 * lines are constant series on the same x; warning bands come from the worst warning rank per
 * bucket, so they cover the whole log at bucket resolution.
 */
import { SEVERITY_LEVELS, type WarningSeverity } from '../kinematics';
import type { LogComparison } from '../logs/compare';
import type { XRange } from './zoom';

export interface PlotLine {
  label: string;
  values: number[];
  /** 'reference' (the sheet's values) is drawn thin over the wider data it is compared with, so both show where they agree; 'tolerance' lines thin and dashed. */
  role: 'data' | 'reference' | 'tolerance';
}

export interface ComparisonPlot {
  key: string;
  title: string;
  yLabel: string;
  x: number[];
  lines: PlotLine[];
}

export interface JointPlots {
  joint: string;
  rates: ComparisonPlot;
  residual: ComparisonPlot;
}

/** A stretch of time (s) during which the worst warning raised had `severity`. */
export interface WarningBand extends XRange {
  severity: WarningSeverity;
}

type Series = LogComparison['series'];

/** One series' envelope: x twice per bucket (first, last sample time) against the bucket's smallest and largest value; null for a label the series lack. */
export function envelope(series: Series, label: string): { x: number[]; y: number[] } | null {
  const s = series.labels.indexOf(label);
  if (s < 0) return null;
  const n = series.from.length;
  const x = new Array<number>(2 * n), y = new Array<number>(2 * n);
  const min = series.min[s]!, max = series.max[s]!;
  for (let b = 0; b < n; b++) {
    x[2 * b] = series.from[b]!;
    x[2 * b + 1] = series.to[b]!;
    y[2 * b] = min[b]!;
    y[2 * b + 1] = max[b]!;
  }
  return { x, y };
}

const constant = (length: number, value: number) => new Array<number>(length).fill(value);
const scaled = (values: number[], factor: number) => values.map((v) => v * factor);

/** Per compared joint: logged against sheet commanded rate (rad/s), and the residual (logged − sheet) between ±tolerance. */
export function jointPlots(result: LogComparison): JointPlots[] {
  const tolerance = result.tolerances.rate;
  return result.joints.flatMap((j) => {
    const logged = envelope(result.series, `${j.joint} logged`);
    const sheet = envelope(result.series, `${j.joint} sheet`);
    const residual = envelope(result.series, `${j.joint} residual`);
    if (!logged || !sheet || !residual) return [];
    const n = logged.x.length;
    return [{
      joint: j.joint,
      rates: {
        key: `${j.joint}:rates`, title: `${j.joint}: commanded rate, logged and sheet`, yLabel: 'rad/s', x: logged.x,
        lines: [{ label: 'logged', values: logged.y, role: 'data' }, { label: 'sheet', values: sheet.y, role: 'reference' }],
      },
      residual: {
        key: `${j.joint}:residual`, title: `${j.joint}: residual, logged − sheet`, yLabel: 'rad/s', x: residual.x,
        lines: [
          { label: 'residual', values: residual.y, role: 'data' },
          { label: '+tolerance', values: constant(n, tolerance), role: 'tolerance' },
          { label: '−tolerance', values: constant(n, -tolerance), role: 'tolerance' },
        ],
      },
    }];
  });
}

/** Slip speed per judged contact (mm/s) with the slip tolerance; null when no contact was judged. */
export function slipPlot(result: LogComparison): ComparisonPlot | null {
  const lines: PlotLine[] = [];
  let x: number[] | null = null;
  for (const c of result.contacts) {
    if (!c.computed) continue;
    const slip = envelope(result.series, `${c.finger} slip`);
    if (!slip) continue;
    x ??= slip.x;
    lines.push({ label: c.finger, values: scaled(slip.y, 1000), role: 'data' });
  }
  if (!x) return null;
  lines.push({ label: 'tolerance', values: constant(x.length, result.tolerances.slip * 1000), role: 'tolerance' });
  return { key: 'slip', title: 'Slip per contact', yLabel: 'mm/s', x, lines };
}

/** Stretches of equal worst warning severity (none left out) from the per-bucket worst rank, each from its first bucket's first sample to its last bucket's last. */
export function warningBands(series: Series): WarningBand[] {
  const s = series.labels.indexOf('worst warning');
  if (s < 0) return [];
  const ranks = series.max[s]!;
  const bands: WarningBand[] = [];
  let open: WarningBand | null = null;
  for (let b = 0; b < series.from.length; b++) {
    const rank = ranks[b]!;
    const level = Number.isInteger(rank) ? SEVERITY_LEVELS[rank] : undefined;
    const severity = level === undefined || level === 'none' ? null : level;
    if (open && open.severity === severity) {
      open.max = series.to[b]!;
      continue;
    }
    if (open) bands.push(open);
    open = severity ? { min: series.from[b]!, max: series.to[b]!, severity } : null;
  }
  if (open) bands.push(open);
  return bands;
}

/** The time the series span (s): first bucket's first sample to last bucket's last; null without buckets. */
export function seriesBounds(series: Series): XRange | null {
  const n = series.from.length;
  if (n === 0) return null;
  const min = series.from[0]!, max = series.to[n - 1]!;
  return max > min ? { min, max } : { min: min - 0.5, max: min + 0.5 };
}
