import { describe, expect, it } from 'vitest';
import { addResidual, addToDecimator, createAccumulator, createDecimator, finishAccumulator, finishDecimator } from '../../../src/lib/logs/statistics';

// Checked against a second route: the same quantities computed directly over the whole series in the test.

describe('running residual statistics', () => {
  it('give the RMS, maximum and its time, the share within tolerance and the intervals over it', () => {
    const values = [0.01, -0.02, 0.3, 0.4, 0.01, 0.5, 0.02];
    const times = values.map((_, i) => i * 0.1);
    const accumulator = createAccumulator(0.05);
    values.forEach((v, i) => addResidual(accumulator, times[i]!, Math.abs(v)));
    const stats = finishAccumulator(accumulator);
    expect(stats.rms).toBeCloseTo(Math.sqrt(values.reduce((sum, v) => sum + v * v, 0) / values.length), 15);
    expect(stats.max).toBe(0.5);
    expect(stats.maxAt).toBeCloseTo(0.5, 15);
    expect(stats.withinFraction).toBeCloseTo(4 / 7, 15);
    expect(stats.intervals).toEqual([
      { from: times[2], to: times[3], samples: 2, rms: Math.sqrt((0.3 ** 2 + 0.4 ** 2) / 2), max: 0.4 },
      { from: times[5], to: times[5], samples: 1, rms: 0.5, max: 0.5 },
    ]);
  });
});

describe('decimated plot series', () => {
  it('keep every bucket\'s smallest and largest value, equal to a direct scan of the samples in the bucket', () => {
    const count = 10_007;
    const series = (i: number) => [Math.sin(i * 0.37) * (i % 97 === 0 ? 5 : 1), i % 3 === 0 ? NaN : Math.cos(i * 0.011)];
    const decimator = createDecimator(['a', 'b'], 64);
    for (let i = 0; i < count; i++) addToDecimator(decimator, i * 0.001, series(i));
    const result = finishDecimator(decimator);
    expect(result.from.length).toBeLessThanOrEqual(64);
    expect(result.from[0]).toBe(0);
    expect(result.to[result.to.length - 1]).toBeCloseTo((count - 1) * 0.001, 12);
    result.from.forEach((from, b) => {
      const first = Math.round(from / 0.001), last = Math.round(result.to[b]! / 0.001);
      for (let s = 0; s < 2; s++) {
        const values = Array.from({ length: last - first + 1 }, (_, k) => series(first + k)[s]!).filter((v) => !Number.isNaN(v));
        expect(result.min[s]![b]).toBe(Math.min(...values));
        expect(result.max[s]![b]).toBe(Math.max(...values));
      }
      if (b > 0) expect(Math.round(from / 0.001)).toBe(Math.round(result.to[b - 1]! / 0.001) + 1);
    });
  });
});
