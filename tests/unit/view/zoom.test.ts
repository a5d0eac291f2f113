import { describe, expect, it } from 'vitest';
import { clampRange, dragShift, MIN_SPAN_FRACTION, panBy, rangeBetween, showsAll, wheelFactor, zoomAt } from '../../../src/lib/view/zoom';

const ALL = { min: 0, max: 100 };

describe('zoomAt', () => {
  it('keeps the point under the pointer in place and scales the span (anchor-fixed zoom, common practice in plotting and map viewers)', () => {
    const range = { min: 20, max: 60 };
    const zoomed = zoomAt(range, 30, 0.5, ALL);
    expect(zoomed.max - zoomed.min).toBeCloseTo(20, 12);
    // The anchor sat a quarter of the way across before and does after.
    expect((30 - zoomed.min) / (zoomed.max - zoomed.min)).toBeCloseTo((30 - range.min) / (range.max - range.min), 12);
    expect(zoomed).toEqual({ min: 25, max: 45 });
  });

  it('zooming in then out by the inverse factor about the same point gives the range back', () => {
    const range = { min: 10, max: 70 };
    const back = zoomAt(zoomAt(range, 42, 0.25, ALL), 42, 4, ALL);
    expect(back.min).toBeCloseTo(10, 9);
    expect(back.max).toBeCloseTo(70, 9);
  });

  it('never zooms out past the data nor in below the narrowest span', () => {
    expect(zoomAt({ min: 10, max: 90 }, 50, 10, ALL)).toEqual(ALL);
    const deep = zoomAt({ min: 40, max: 60 }, 50, 1e-9, ALL);
    expect(deep.max - deep.min).toBeCloseTo(100 * MIN_SPAN_FRACTION, 12);
    expect((deep.min + deep.max) / 2).toBeCloseTo(50, 9);
  });

  it('slides a zoom near an end back inside the data', () => {
    const zoomed = zoomAt({ min: 0, max: 50 }, 2, 1.5, ALL);
    expect(zoomed.min).toBe(0);
    expect(zoomed.max).toBeCloseTo(75, 12);
  });

  it('ignores a factor or anchor that is not a finite number', () => {
    expect(zoomAt({ min: 10, max: 20 }, 15, NaN, ALL)).toEqual({ min: 10, max: 20 });
    expect(zoomAt({ min: 10, max: 20 }, Infinity, 0.5, ALL)).toEqual({ min: 12.5, max: 17.5 });
  });
});

describe('panBy', () => {
  it('shifts the range and keeps its span', () => {
    expect(panBy({ min: 10, max: 30 }, 15, ALL)).toEqual({ min: 25, max: 45 });
  });

  it('stops at either end of the data', () => {
    expect(panBy({ min: 10, max: 30 }, -50, ALL)).toEqual({ min: 0, max: 20 });
    expect(panBy({ min: 10, max: 30 }, 500, ALL)).toEqual({ min: 80, max: 100 });
  });
});

describe('dragShift', () => {
  it('moves the view against the drag: a drag of a quarter of the plot to the right shows a quarter span earlier', () => {
    expect(dragShift({ min: 0, max: 40 }, 100, 400)).toBe(-10);
    expect(dragShift({ min: 0, max: 40 }, 5, 0)).toBe(0);
  });
});

describe('wheelFactor', () => {
  it('zooms in on wheel up, out on wheel down, and a notch up undoes a notch down', () => {
    expect(wheelFactor(-100, 0)).toBeLessThan(1);
    expect(wheelFactor(100, 0)).toBeGreaterThan(1);
    expect(wheelFactor(100, 0) * wheelFactor(-100, 0)).toBeCloseTo(1, 12);
  });

  it('reads line and page deltas as the pixels they stand for', () => {
    expect(wheelFactor(3, 1)).toBeCloseTo(wheelFactor(48, 0), 12);
    expect(wheelFactor(1, 2)).toBeGreaterThan(wheelFactor(3, 1));
    expect(wheelFactor(NaN, 0)).toBe(1);
  });
});

describe('rangeBetween', () => {
  it('orders the ends of a drag either way', () => {
    expect(rangeBetween(70, 30, ALL)).toEqual({ min: 30, max: 70 });
  });

  it('is null for a click or a drag narrower than the narrowest span', () => {
    expect(rangeBetween(30, 30, ALL)).toBeNull();
    expect(rangeBetween(30, 30 + 100 * MIN_SPAN_FRACTION / 2, ALL)).toBeNull();
    expect(rangeBetween(NaN, 30, ALL)).toBeNull();
  });
});

describe('clampRange and showsAll', () => {
  it('gives the whole data for a range wider than it or not a number', () => {
    expect(clampRange({ min: -5, max: 200 }, ALL)).toEqual(ALL);
    expect(clampRange({ min: NaN, max: 3 }, ALL)).toEqual(ALL);
  });

  it('knows a range that shows everything', () => {
    expect(showsAll(null, ALL)).toBe(true);
    expect(showsAll({ min: 0, max: 100 }, ALL)).toBe(true);
    expect(showsAll({ min: 0, max: 99 }, ALL)).toBe(false);
  });
});
