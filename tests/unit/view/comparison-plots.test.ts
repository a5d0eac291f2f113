import { describe, expect, it } from 'vitest';
import { SEVERITY_LEVELS, WARNING_CATALOGUE } from '../../../src/lib/kinematics/index';
import { compareLog, type LogComparison } from '../../../src/lib/logs/compare';
import { envelope, jointPlots, seriesBounds, slipPlot, warningBands } from '../../../src/lib/view/comparison-plots';
import { generatedRun, logText } from '../logs/generated-log';

const run = generatedRun(400);
const BUCKETS = 40;
const JOINT = 'southeast-base';

/** A comparison with a spike injected at one tick, and every compared sample as the engine streamed it (the per-sample truth the plots decimate). */
async function comparedWithSamples() {
  const column = run.header.indexOf(`${JOINT}.commanded`);
  const samples: { time: number; residual: number[]; slip: number[]; rank: number }[] = [];
  let joints: string[] = [];
  const outcome = await compareLog(run.doc, run.mapping, logText(run, (row, tick) => {
    if (tick === 123) row[column]! += 0.8;
  }), {
    plotBuckets: BUCKETS,
    onColumns: (columns) => (joints = columns.joints),
    onSample: (s) => samples.push({
      time: s.time,
      residual: Array.from(s.residual),
      slip: Array.from(s.slip),
      rank: Math.max(0, ...s.warnings.map((code) => SEVERITY_LEVELS.indexOf(WARNING_CATALOGUE[code].severity))),
    }),
  });
  if (!outcome.ok) throw new Error(outcome.error.message);
  return { result: outcome.value, samples, joints };
}

const { result, samples, joints } = await comparedWithSamples();

describe('envelope', () => {
  it('reaches, in every bucket, the smallest and largest per-sample value between its first and last time (min/max decimation keeps extremes, common practice for plotting long signals)', () => {
    const c = joints.indexOf(JOINT);
    const e = envelope(result.series, `${JOINT} residual`)!;
    expect(e.x.length).toBe(2 * result.series.from.length);
    for (let b = 0; b < e.x.length / 2; b++) {
      const inBucket = samples.filter((s) => s.time >= e.x[2 * b]! && s.time <= e.x[2 * b + 1]!).map((s) => s.residual[c]!);
      expect(e.y[2 * b]).toBe(Math.min(...inBucket));
      expect(e.y[2 * b + 1]).toBe(Math.max(...inBucket));
    }
    expect(Math.max(...e.y)).toBeCloseTo(0.8, 9);
  });

  it('is null for a series the comparison lacks', () => {
    expect(envelope(result.series, 'no-such-joint residual')).toBeNull();
  });
});

describe('jointPlots', () => {
  it('gives each compared joint its logged and sheet rates, and its residual between ±tolerance', () => {
    const plots = jointPlots(result);
    expect(plots.map((p) => p.joint)).toEqual(result.joints.map((j) => j.joint));
    const plot = plots.find((p) => p.joint === JOINT)!;
    expect(plot.rates.lines.map((l) => [l.label, l.role])).toEqual([['logged', 'data'], ['sheet', 'reference']]);
    const [residual, upper, lower] = plot.residual.lines;
    expect(residual!.role).toBe('data');
    expect(upper!.values.every((v) => v === result.tolerances.rate)).toBe(true);
    expect(lower!.values.every((v) => v === -result.tolerances.rate)).toBe(true);
    expect(upper!.values.length).toBe(plot.residual.x.length);
    // Logged − sheet of the envelope's extremes bound the residual extremes the engine streamed.
    expect(Math.max(...residual!.values)).toBeCloseTo(Math.max(...samples.map((s) => s.residual[joints.indexOf(JOINT)]!)), 12);
  });
});

describe('slipPlot', () => {
  it('draws the slip of every judged contact in mm/s with the tolerance line (1 m/s = 1000 mm/s)', () => {
    const plot = slipPlot(result)!;
    const judged = result.contacts.filter((c) => c.computed).map((c) => c.finger);
    expect(plot.lines.map((l) => l.label)).toEqual([...judged, 'tolerance']);
    const f = result.contacts.findIndex((c) => c.computed);
    const largest = Math.max(...samples.map((s) => s.slip[f]!).filter((v) => !Number.isNaN(v)));
    expect(Math.max(...plot.lines[0]!.values.filter((v) => !Number.isNaN(v)))).toBeCloseTo(largest * 1000, 9);
    expect(plot.lines.at(-1)!.values[0]).toBeCloseTo(result.tolerances.slip * 1000, 12);
  });

  it('is null when no contact was judged', () => {
    const none: LogComparison = { ...result, contacts: result.contacts.map((c) => ({ ...c, computed: false })) };
    expect(slipPlot(none)).toBeNull();
  });
});

describe('warningBands', () => {
  const series = (ranks: number[]) => ({
    labels: ['a residual', 'worst warning'],
    from: ranks.map((_, b) => 2 * b),
    to: ranks.map((_, b) => 2 * b + 1),
    min: [ranks.map(() => 0), ranks.map(() => 0)],
    max: [ranks.map(() => 0), ranks],
  });

  it('merges neighbouring buckets of one severity from the first bucket\'s first sample to the last\'s last', () => {
    // Ranks index SEVERITY_LEVELS: none, note, caution, singular.
    expect(warningBands(series([0, 1, 1, 2, 0, 3]))).toEqual([
      { min: 2, max: 5, severity: 'note' },
      { min: 6, max: 7, severity: 'caution' },
      { min: 10, max: 11, severity: 'singular' },
    ]);
    expect(warningBands(series([0, 0]))).toEqual([]);
    expect(warningBands({ ...series([1]), labels: ['a residual', 'other'] })).toEqual([]);
  });

  it('covers every streamed sample at which a warning was raised with a band at least that severe', () => {
    const bands = warningBands(result.series);
    expect(samples.filter((x) => x.rank > 0).length, 'the generated run raises warnings to band').toBeGreaterThan(0);
    for (const s of samples.filter((x) => x.rank > 0)) {
      const band = bands.find((b) => s.time >= b.min && s.time <= b.max);
      expect(band, `warning at t = ${s.time}`).toBeDefined();
      expect(SEVERITY_LEVELS.indexOf(band!.severity)).toBeGreaterThanOrEqual(s.rank);
    }
  });
});

describe('seriesBounds', () => {
  it('spans the first to the last compared sample', () => {
    expect(seriesBounds(result.series)).toEqual({ min: samples[0]!.time, max: samples.at(-1)!.time });
    expect(seriesBounds({ labels: [], from: [], to: [], min: [], max: [] })).toBeNull();
  });
});
