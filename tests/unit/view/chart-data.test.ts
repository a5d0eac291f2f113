import { unit as referenceUnit } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from '../../../src/lib/sheet/display-units';
import { formatTick, indexRangesToX, plottable, seriesStyle, shownColumn } from '../../../src/lib/view/chart-data';

describe('shownColumn', () => {
  const SI: DisplayUnits = { length: 'm', angle: 'rad', angularSpeed: 'rad/s' };
  const OTHERS: DisplayUnits = { length: 'm', angle: 'rad', angularSpeed: 'rpm' };
  const column = new Float64Array([0.0125, -0.5, 0, 3]);

  it('converts lengths, speeds and angles as the mathjs package converts them, and names the unit for the axis', () => {
    // Reference: a separate, default mathjs instance, value by value.
    for (const [siUnit, unit] of [['m', 'mm'], ['m/s', 'mm/s'], ['rad', 'deg']] as const) {
      const shown = shownColumn(column, siUnit, DEFAULT_DISPLAY_UNITS);
      expect(shown.unit).toBe(unit);
      expect(Array.from(shown.values)).toBeNear(Array.from(column, (v) => referenceUnit(v, siUnit).toNumber(unit)), { rel: 1e-14 });
    }
  });

  it('converts joint rates to rpm: one revolution (2π rad) per minute (ISO 80000-3)', () => {
    const shown = shownColumn(new Float64Array([2 * Math.PI, -Math.PI, 0]), 'rad/s', OTHERS);
    expect(shown.unit).toBe('rpm');
    expect(Array.from(shown.values)).toBeNear([60, -30, 0], { rel: 1e-14 });
  });

  it('hands back the same column, not a copy, when the unit stays, and the SI input untouched when it does not', () => {
    expect(shownColumn(column, 'm', SI)).toEqual({ values: column, unit: 'm' });
    expect(shownColumn(column, 'm', SI).values).toBe(column);
    expect(shownColumn(column, '1', DEFAULT_DISPLAY_UNITS).values).toBe(column);
    shownColumn(column, 'm', DEFAULT_DISPLAY_UNITS);
    expect(Array.from(column)).toEqual([0.0125, -0.5, 0, 3]);
  });
});

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
