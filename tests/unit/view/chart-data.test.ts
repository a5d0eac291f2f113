import { describe, expect, it } from 'vitest';
import { indexRangesToX, plottable, seriesStyle } from '../../../src/lib/view/chart-data';

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
