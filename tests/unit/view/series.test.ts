import { describe, expect, it } from 'vitest';
import { runSheet, SEVERITY_LEVELS, sweepSheet, WARNING_CODES } from '../../../src/lib/kinematics';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import { column, describeStopReason, runSeries, severityRuns, sweepSeries, transferablesOf } from '../../../src/lib/view/series';

function sheet() {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  doc.motion.run = { ...doc.motion.run, maxTicks: 60, stopOnSingular: false };
  return doc;
}

describe('column', () => {
  it('picks column k of a row-major table', () => {
    expect(Array.from(column([1, 2, 3, 4, 5, 6], 3, 1, 2))).toEqual([2, 5]);
  });
});

describe('severityRuns', () => {
  it('gathers equal non-zero levels into [start, end) stretches', () => {
    expect(severityRuns([0, 1, 1, 3, 0, 0, 2])).toEqual([
      { start: 1, end: 3, level: 1 },
      { start: 3, end: 4, level: 3 },
      { start: 6, end: 7, level: 2 },
    ]);
    expect(severityRuns([])).toEqual([]);
    expect(severityRuns([0, 0])).toEqual([]);
  });
});

describe('runSeries', () => {
  const doc = sheet();
  const record = runSheet(doc);
  const series = runSeries(doc, record, 12.5);

  it('de-interleaves every joint and metric column of the record', () => {
    expect(series.tickCount).toBe(record.tickCount);
    expect(series.elapsedMs).toBe(12.5);
    expect(Array.from(series.ticks.slice(0, 3))).toEqual([0, 1, 2]);
    expect([series.commanded, series.followed]).toEqual(['steer-and-roll', 'steer-and-roll']);
    // Time axis in seconds: tick k of a fixed-step run is k time steps from the start (common practice for fixed-step integration).
    expect(series.time).toHaveLength(record.tickCount);
    expect(series.time[record.tickCount - 1]).toBeCloseTo((record.tickCount - 1) * doc.motion.run.dt, 12);
    expect(series.jointAngles).toHaveLength(9);
    expect(series.jointAngles[4]!.joint).toBe(doc.hand.fingers[1]!.joints[1]!.name);
    for (let t = 0; t < record.tickCount; t++) {
      expect(series.jointAngles[4]!.values[t]).toBe(record.jointAngles[1]![3 * t + 1]);
      expect(series.jointRates[8]!.values[t]).toBe(record.jointRates[2]![3 * t + 2]);
      expect(series.orientationError[4]!.values[t]).toBe(record.orientationError[5 * t + 4]);
    }
    expect(series.orientationError.map((m) => m.key)).toEqual(['phi2', 'phi3', 'phi4', 'phi5', 'phi6']);
  });

  it('lists the ticks of each warning code from the bit masks', () => {
    for (const warning of series.warnings) {
      const bit = WARNING_CODES.indexOf(warning.code);
      const expected = Array.from(record.warningMask.keys()).filter((t) => (record.warningMask[t]! & (1 << bit)) !== 0);
      expect(Array.from(warning.indices)).toEqual(expected);
    }
    const masked = Array.from(record.warningMask).some((m) => m !== 0);
    expect(series.warnings.length > 0).toBe(masked);
  });

  it('hands over every buffer once', () => {
    const buffers = transferablesOf(series);
    expect(new Set(buffers).size).toBe(buffers.length);
    expect(buffers).toContain(series.jointAngles[0]!.values.buffer);
    expect(buffers).toContain(series.worstSeverity.buffer);
    expect(series.warnings.length).toBeGreaterThan(0);
    for (const warning of series.warnings) expect(buffers).toContain(warning.indices.buffer);
  });
});

describe('sweepSeries', () => {
  it('gives per-finger outputs at each swept value and where warnings appeared', () => {
    const doc = sheet();
    const record = sweepSheet(doc, { path: '/solver/singularRatio', from: 1e-9, to: 0.999999, steps: 3 });
    const series = sweepSeries(doc, record, 3);
    expect(series.fingers).toHaveLength(3);
    // The rate lines plot the commanded solution (steer-and-roll by default) and say so.
    expect(series.fingers[1]!.rates[2]!.values[2]).toBe(record.results[2]!.fingers[1]!.steer.rates[2]);
    expect(series.followed).toBe('steer-and-roll');
    const full = sweepSeries({ ...doc, commanded: 'full' }, record, 3);
    expect(full.fingers[1]!.rates[2]!.values[2]).toBe(record.results[2]!.fingers[1]!.full.rates[2]);
    expect(full.followed).toBe('full solution');
    expect(series.fingers[0]!.gap[1]).toBe(record.results[1]!.fingers[0]!.contact.gap);
    // The ratio plotted is the one the rank-loss warning judges, and the slip is the followed solution's.
    expect(series.fingers[2]!.rankRatio[0]).toBe(record.results[0]!.fingers[2]!.rankRatio);
    expect(series.fingers[1]!.residual[2]).toBe(record.results[2]!.fingers[1]!.steer.residualNorm);
    expect(full.fingers[1]!.residual[2]).toBe(record.results[2]!.fingers[1]!.full.residualNorm);
    const rankLoss = series.warnings.find((w) => w.code === 'JACOBIAN_NEAR_RANK_LOSS')!;
    expect(rankLoss.indices).toContain(2);
    expect(rankLoss.severity).toBe('singular');
    expect(SEVERITY_LEVELS[series.worstSeverity[2]!]).toBe('singular');
  });
});

describe('sweepSeries of the time step', () => {
  it('spreads each steered pivot\'s change over the swept time step, not the sheet\'s (rate = change / Δt, first-order difference; common practice)', () => {
    const doc = sheet();
    // A lift and a tilt that the rollers' rolling directions do not meet as they stand, so the pivots steer.
    doc.object.twist = { linear: [0, 0.004, 0.01], angular: [0.3, 0, 0.1] };
    const record = sweepSheet(doc, { path: '/motion/run/dt', from: 0.002, to: 0.02, steps: 4 });
    const series = sweepSeries(doc, record, 1);
    const pivot = doc.hand.fingers[0]!.joints.findIndex((joint) => joint.role === 'pivot');
    const change = record.results[0]!.fingers[0]!.steer.pivotChange;
    expect(Math.abs(change)).toBeGreaterThan(0);
    record.values.forEach((dt, i) => {
      expect(series.fingers[0]!.rates[pivot]!.values[i]).toBeCloseTo(change / dt, 12);
    });
    expect(record.values[0]).not.toBe(doc.motion.run.dt);
  });
});

describe('describeStopReason', () => {
  it('puts each stop reason in words', () => {
    expect(describeStopReason('converged')).toMatch(/reached the target/);
    expect(describeStopReason('tick-limit')).toMatch(/most time steps/);
    expect(describeStopReason('singular')).toMatch(/singular/);
  });
});
