/**
 * Running statistics of one residual over a streamed log (constant memory per quantity): RMS,
 * largest magnitude and its time, the share of samples within tolerance, and the intervals
 * where the magnitude exceeds the tolerance; and a decimated copy of many series for plots that
 * keeps each bucket's smallest and largest value, so no peak is lost however long the log.
 */

/** Most intervals over tolerance kept per quantity; the rest are counted. */
export const MAX_INTERVALS = 200;

/** A stretch of consecutive samples whose magnitude exceeds the tolerance: first and last sample time (s), sample count, RMS and largest magnitude there. */
export interface OverInterval {
  from: number;
  to: number;
  samples: number;
  rms: number;
  max: number;
}

export interface ResidualStatistics {
  samples: number;
  rms: number;
  max: number;
  /** Time of the largest magnitude, s (null without samples). */
  maxAt: number | null;
  /** Share of samples whose magnitude is at most the tolerance (0 to 1). */
  withinFraction: number;
  intervals: OverInterval[];
  /** Intervals over tolerance beyond MAX_INTERVALS, counted but not listed. */
  intervalsOmitted: number;
}

export interface ResidualAccumulator {
  tolerance: number;
  samples: number;
  sumSquares: number;
  max: number;
  maxAt: number;
  within: number;
  open: OverInterval | null;
  openSumSquares: number;
  intervals: OverInterval[];
  omitted: number;
}

/** An empty accumulator judging magnitudes against `tolerance` (the residual's unit). */
export function createAccumulator(tolerance: number): ResidualAccumulator {
  return { tolerance, samples: 0, sumSquares: 0, max: 0, maxAt: NaN, within: 0, open: null, openSumSquares: 0, intervals: [], omitted: 0 };
}

function closeInterval(a: ResidualAccumulator): void {
  const open = a.open;
  if (open === null) return;
  open.rms = Math.sqrt(a.openSumSquares / open.samples);
  if (a.intervals.length < MAX_INTERVALS) a.intervals.push(open);
  else a.omitted++;
  a.open = null;
  a.openSumSquares = 0;
}

/** Adds one sample's residual magnitude (its unit) at time (s). */
export function addResidual(a: ResidualAccumulator, time: number, magnitude: number): void {
  a.samples++;
  a.sumSquares += magnitude * magnitude;
  if (magnitude > a.max || a.samples === 1) {
    a.max = magnitude;
    a.maxAt = time;
  }
  if (magnitude <= a.tolerance) {
    a.within++;
    closeInterval(a);
    return;
  }
  if (a.open === null) a.open = { from: time, to: time, samples: 0, rms: 0, max: 0 };
  a.open.to = time;
  a.open.samples++;
  a.openSumSquares += magnitude * magnitude;
  if (magnitude > a.open.max) a.open.max = magnitude;
}

/** Ends an interval over tolerance at a gap in the log, so one interval never spans missing samples. */
export function breakInterval(a: ResidualAccumulator): void {
  closeInterval(a);
}

/** The statistics so far, closing an open interval over tolerance. */
export function finishAccumulator(a: ResidualAccumulator): ResidualStatistics {
  closeInterval(a);
  const n = a.samples;
  return {
    samples: n,
    rms: n === 0 ? 0 : Math.sqrt(a.sumSquares / n),
    max: a.max,
    maxAt: n === 0 ? null : a.maxAt,
    withinFraction: n === 0 ? 0 : a.within / n,
    intervals: a.intervals,
    intervalsOmitted: a.omitted,
  };
}

/** Decimated series: per bucket its first and last sample time (s) and each series' smallest and largest value (NaN where it had none). */
export interface DecimatedSeries {
  labels: string[];
  from: number[];
  to: number[];
  min: number[][];
  max: number[][];
}

export interface Decimator {
  labels: string[];
  capacity: number;
  bucketSize: number;
  count: number;
  filled: number;
  from: Float64Array;
  to: Float64Array;
  min: Float64Array;
  max: Float64Array;
}

/** A decimator keeping at most `buckets` buckets (at least 2, even) of the named series. */
export function createDecimator(labels: string[], buckets: number): Decimator {
  const capacity = Math.max(2, buckets - (buckets % 2));
  const n = labels.length;
  return {
    labels, capacity, bucketSize: 1, count: 0, filled: 0,
    from: new Float64Array(capacity), to: new Float64Array(capacity),
    min: new Float64Array(capacity * n).fill(NaN), max: new Float64Array(capacity * n).fill(NaN),
  };
}

/** Halves the buckets by merging neighbours; the bucket size doubles. */
function mergePairs(d: Decimator): void {
  const n = d.labels.length;
  for (let b = 0; b < d.capacity / 2; b++) {
    const l = 2 * b, r = 2 * b + 1;
    d.from[b] = d.from[l]!;
    d.to[b] = d.to[r]!;
    for (let s = 0; s < n; s++) {
      const lo = Math.min(d.min[l * n + s]!, d.min[r * n + s]!), hi = Math.max(d.max[l * n + s]!, d.max[r * n + s]!);
      // Math.min with NaN is NaN: a series missing in one half keeps the other half's value.
      d.min[b * n + s] = Number.isNaN(lo) ? (Number.isNaN(d.min[l * n + s]!) ? d.min[r * n + s]! : d.min[l * n + s]!) : lo;
      d.max[b * n + s] = Number.isNaN(hi) ? (Number.isNaN(d.max[l * n + s]!) ? d.max[r * n + s]! : d.max[l * n + s]!) : hi;
    }
  }
  d.min.fill(NaN, (d.capacity / 2) * n);
  d.max.fill(NaN, (d.capacity / 2) * n);
  d.count = d.capacity / 2;
  d.bucketSize *= 2;
}

/** Adds one sample: its time (s) and one value per series (NaN where a series has no value). */
export function addToDecimator(d: Decimator, time: number, values: ArrayLike<number>): void {
  const n = d.labels.length;
  if (d.filled === 0) {
    if (d.count === d.capacity) mergePairs(d);
    d.from[d.count] = time;
    d.count++;
  }
  const b = d.count - 1;
  d.to[b] = time;
  for (let s = 0; s < n; s++) {
    const v = values[s]!;
    if (Number.isNaN(v)) continue;
    const o = b * n + s;
    if (!(v >= d.min[o]!)) d.min[o] = v;
    if (!(v <= d.max[o]!)) d.max[o] = v;
  }
  d.filled++;
  if (d.filled >= d.bucketSize) d.filled = 0;
}

/** The buckets filled so far as plain arrays. */
export function finishDecimator(d: Decimator): DecimatedSeries {
  const n = d.labels.length;
  const column = (source: Float64Array, s: number) => Array.from({ length: d.count }, (_, b) => source[b * n + s]!);
  return {
    labels: d.labels,
    from: Array.from(d.from.subarray(0, d.count)),
    to: Array.from(d.to.subarray(0, d.count)),
    min: d.labels.map((_, s) => column(d.min, s)),
    max: d.labels.map((_, s) => column(d.max, s)),
  };
}
