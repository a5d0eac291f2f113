import { describe, expect, it } from 'vitest';
import { formatTick, indexRangesToX, plottable, seriesStyle } from '../../../src/lib/view/chart-data';

describe('plottable', () => {
  it('passes a clean column through untouched', () => {
    const values = new Float64Array([1, 2, 3]);
    expect(plottable(values)).toBe(values);
  });

  it('puts null where uPlot cannot draw: non-finite, and on a log axis non-positive', () => {
    expect(plottable([1, NaN, Infinity, -2])).toEqual([1, null, null, -2]);
    expect(plottable([1, 0, -2, 5], true)).toEqual([1, null, null, 5]);
  });
});

describe('seriesStyle', () => {
  it('takes colours in turn, then dashes', () => {
    expect(seriesStyle(1, ['a', 'b'])).toEqual({ stroke: 'b' });
    expect(seriesStyle(2, ['a', 'b'])).toEqual({ stroke: 'a', dash: [6, 3] });
    expect(seriesStyle(5, ['a', 'b'])).toEqual({ stroke: 'b', dash: [2, 3] });
  });
});

describe('indexRangesToX', () => {
  it('widens index stretches by half a step on each side', () => {
    const x = [0, 2, 4, 6];
    expect(indexRangesToX(x, [{ start: 1, end: 3 }])).toEqual([{ from: 1, to: 5 }]);
    expect(indexRangesToX(x, [{ start: 0, end: 1 }])).toEqual([{ from: -1, to: 1 }]);
    expect(indexRangesToX(x, [{ start: 3, end: 4 }])).toEqual([{ from: 5, to: 7 }]);
    expect(indexRangesToX([], [{ start: 0, end: 1 }])).toEqual([]);
  });
});

describe('formatTick', () => {
  it('writes large and small magnitudes with an exponent and the rest plainly', () => {
    expect(formatTick(100_000_000)).toBe('1e8');
    expect(formatTick(250_000)).toBe('2.5e5');
    expect(formatTick(0.0004)).toBe('4e-4');
    expect(formatTick(-0.000123456)).toBe('-1.23e-4');
    expect(formatTick(0)).toBe('0');
    expect(formatTick(-0.25)).toBe('-0.25');
    expect(formatTick(12345)).toBe('12350');
  });
});
