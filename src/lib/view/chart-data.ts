/** Preparing columns for uPlot, which reads null as a gap but cannot place NaN, infinities or, on a log axis, values <= 0. */
import { displayFactor, shownUnit, type DisplayUnits } from '../sheet/display-units';

/**
 * An SI column in the unit the sheet's display choice shows it in, with that unit for the axis
 * label; the same column when the unit stays. Only charts read it: the series and exports stay SI.
 */
export function shownColumn(values: Float64Array, siUnit: string, units: DisplayUnits): { values: Float64Array; unit: string } {
  const unit = shownUnit(siUnit, units);
  if (unit === siUnit) return { values, unit };
  // The units a sheet shows are proportional to SI, so one factor serves the whole column.
  const factor = displayFactor(siUnit, unit);
  // A plain loop: TypedArray.map with a callback took several milliseconds per run's charts.
  const shown = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) shown[i] = values[i]! * factor;
  return { values: shown, unit };
}

/** The column as uPlot can draw it: unchanged when every value is plottable, else a copy with null in the gaps. */
export function plottable(values: ArrayLike<number>, logScale = false): ArrayLike<number> | (number | null)[] {
  const drawable = (v: number) => Number.isFinite(v) && (!logScale || v > 0);
  for (let i = 0; i < values.length; i++) {
    if (!drawable(values[i]!)) return Array.from(values, (v) => (drawable(v) ? v : null));
  }
  return values;
}

/** Line style of the i-th series: colours in turn, then dashed once they run out. */
export function seriesStyle(i: number, colours: readonly string[]): { stroke: string; dash?: number[] } {
  const stroke = colours[i % colours.length]!;
  const round = Math.floor(i / colours.length);
  return round === 0 ? { stroke } : { stroke, dash: round === 1 ? [6, 3] : [2, 3] };
}

/** Ranges of x values covering index stretches [start, end), widened by half a step so single points show (x evenly spaced or not). */
export function indexRangesToX(x: ArrayLike<number>, ranges: { start: number; end: number }[]): { from: number; to: number }[] {
  const n = x.length;
  if (n === 0) return [];
  const half = (i: number, j: number) => (n > 1 ? 0.5 * (x[Math.min(n - 1, j)]! - x[Math.max(0, i)]!) : 0);
  return ranges.map(({ start, end }) => ({
    from: x[start]! - (start > 0 ? half(start - 1, start) : half(0, 1)),
    to: x[end - 1]! + (end < n ? half(end - 1, end) : half(n - 2, n - 1)),
  }));
}

/** Tick labels short enough for a narrow axis: exponent form for very large or small magnitudes. */
export function formatTick(value: number): string {
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude >= 1e5 || magnitude < 1e-3)) return Number(value.toPrecision(3)).toExponential().replace('e+', 'e');
  return String(Number(value.toPrecision(4)));
}
