import { describe, expect, it } from 'vitest';
import { formatQuantity, fromSI, parseQuantity, parseVariables, toSI } from '../../../src/lib/sheet/units';

// Exact conversion factors from NIST Special Publication 811 (2008), Appendix B.8/B.9 and the
// SI Brochure (9th ed., 2019), Table 8: 1 in = 0.0254 m exactly, 1 ft = 0.3048 m exactly,
// 1 deg = pi/180 rad, 1 min = 60 s, 1 mm = 1e-3 m (prefix milli, SI Brochure Table 7).

describe('parseQuantity', () => {
  it('reads plain numbers as SI values', () => {
    expect(parseQuantity(0.012, 'length')).toEqual({ ok: true, value: 0.012 });
    expect(parseQuantity(-1.5, 'angle')).toEqual({ ok: true, value: -1.5 });
  });

  it.each([
    ['12 mm', 'length', 0.012],
    ['1 in', 'length', 0.0254],
    ['1 ft', 'length', 0.3048],
    ['2.5 cm', 'length', 0.025],
    ['30 deg', 'angle', Math.PI / 6],
    ['180 deg', 'angle', Math.PI],
    ['0.5 rad', 'angle', 0.5],
    ['20 mm/s', 'speed', 0.02],
    ['1 in/s', 'speed', 0.0254],
    ['0.5 rad/s', 'angularSpeed', 0.5],
    ['90 deg/s', 'angularSpeed', Math.PI / 2],
    ['60 rpm', 'angularSpeed', 2 * Math.PI],
    ['5 ms', 'time', 0.005],
    ['2 min', 'time', 120],
    ['2 /s', 'rate', 2],
    ['3 Hz', 'rate', 3],
  ] as const)('converts %s (%s) to SI', (text, kind, expected) => {
    const result = parseQuantity(text, kind);
    expect(result.ok).toBe(true);
    if (result.ok) expect(result.value).toBeCloseTo(expected, 14);
  });

  it('rejects a wrong dimension with a message naming what was expected and what was given', () => {
    expect(parseQuantity('30 deg', 'length')).toEqual({ ok: false, message: 'expected a length, got 30 deg' });
    expect(parseQuantity('12 mm', 'angle')).toEqual({ ok: false, message: 'expected an angle, got 12 mm' });
    expect(parseQuantity('20 mm', 'speed')).toEqual({ ok: false, message: 'expected a speed, got 20 mm' });
    // rad/s and 1/s differ: an angle per time is not a plain rate.
    expect(parseQuantity('2 rad/s', 'rate').ok).toBe(false);
  });

  it('rejects unknown units, strings without a unit and non-finite numbers', () => {
    const unknown = parseQuantity('12 furlongz', 'length');
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.message).toContain('could not read "12 furlongz"');
    const bare = parseQuantity('12', 'length');
    expect(bare.ok).toBe(false);
    if (!bare.ok) expect(bare.message).toContain('without a unit');
    expect(parseQuantity(Number.NaN, 'length').ok).toBe(false);
    expect(parseQuantity(Number.POSITIVE_INFINITY, 'time').ok).toBe(false);
  });

  it('reads any dimension to its SI base value for kind "any"', () => {
    expect(parseQuantity('5 mm', 'any')).toEqual({ ok: true, value: 0.005 });
    const angle = parseQuantity('90 deg', 'any');
    expect(angle.ok && angle.value).toBeCloseTo(Math.PI / 2, 15);
  });
});

describe('parseQuantity read again (the cache of expressions without variables)', () => {
  // 1 mm = 1e-3 m (SI Brochure, 9th ed., Table 7); the sums are plain arithmetic.
  it('gives the same value each time an unchanged text is read', () => {
    expect(parseQuantity('3 mm + 4 mm', 'length')).toEqual({ ok: true, value: 0.007 });
    expect(parseQuantity('3 mm + 4 mm', 'length')).toEqual({ ok: true, value: 0.007 });
    expect(parseQuantity('3 mm + 4 mm', 'angle').ok).toBe(false);
  });

  it('follows the variables: a text read before its variable existed, or with another value, reads the current one', () => {
    const text = 'cacheProbe + 1 mm';
    expect(parseQuantity(text, 'length')).toMatchObject({ ok: false });
    const small = parseVariables('cacheProbe = 1 mm');
    const large = parseVariables('cacheProbe = 2 mm');
    expect(parseQuantity(text, 'length', small.values)).toMatchObject({ ok: true, value: expect.closeTo(0.002, 12) });
    expect(parseQuantity(text, 'length', large.values)).toMatchObject({ ok: true, value: expect.closeTo(0.003, 12) });
    expect(parseQuantity(text, 'length')).toMatchObject({ ok: false });
  });
});

describe('toSI', () => {
  it('returns the SI value or throws the parse message', () => {
    expect(toSI('25.4 mm', 'length')).toBeCloseTo(0.0254, 15);
    expect(() => toSI('30 deg', 'length')).toThrow('expected a length, got 30 deg');
  });
});

describe('fromSI', () => {
  it('expresses SI values in a display unit', () => {
    expect(fromSI(0.0254, 'length', 'mm')).toBeCloseTo(25.4, 12);
    expect(fromSI(0.0254, 'length', 'in')).toBeCloseTo(1, 14);
    expect(fromSI(Math.PI, 'angle', 'deg')).toBeCloseTo(180, 12);
    expect(fromSI(2 * Math.PI, 'angularSpeed', 'rpm')).toBeCloseTo(60, 12);
  });

  it('refuses a display unit of another dimension', () => {
    expect(() => fromSI(1, 'length', 'deg')).toThrow();
  });
});

describe('formatQuantity', () => {
  it('rounds to significant digits and appends the unit', () => {
    expect(formatQuantity(0.012, 'length', 'mm')).toBe('12 mm');
    expect(formatQuantity(Math.PI / 6, 'angle', 'deg')).toBe('30 deg');
    expect(formatQuantity(0.123456, 'speed', 'mm/s', 3)).toBe('123 mm/s');
    expect(formatQuantity(-1e-20, 'length', 'mm', 2)).toBe('-1e-17 mm');
  });
});
