import { describe, expect, it } from 'vitest';

// The matcher itself: tests/helpers/tolerance.ts, registered through setupFiles.

function failure(check: () => void): string {
  try {
    check();
  } catch (error) {
    return (error as Error).message;
  }
  throw new Error('expected the check to fail');
}

describe('toBeNear with digits (the rule of vitest toBeCloseTo: |a - e| < 10^-digits / 2)', () => {
  it('passes within and fails at or past half a unit of the last digit', () => {
    expect(1 + 4e-13).toBeNear(1, { digits: 12 });
    expect(1 + 6e-13).not.toBeNear(1, { digits: 12 });
    expect(1).not.toBeNear(0.5, { digits: 0 });
  });

  it('agrees with toBeCloseTo on each element', () => {
    for (const [a, e, d] of [[0.1 + 0.2, 0.3, 15], [1e-9, 0, 9], [1e-9, 0, 8], [2.5, 2.4, 0]] as const) {
      const closeTo = Math.abs(a - e) < 10 ** -d / 2;
      if (closeTo) expect([a]).toBeNear([e], { digits: d });
      else expect([a]).not.toBeNear([e], { digits: d });
    }
  });
});

describe('toBeNear with abs and rel (the rule of numpy.isclose: |a - e| <= abs + rel |e|)', () => {
  it('includes the bound itself, so abs 0 asks for equality', () => {
    expect(1).toBeNear(0.5, { abs: 0.5 });
    expect([0, 5e-324]).toBeNear([0, 5e-324], { abs: 0 });
    expect([0, 5e-324]).not.toBeNear([0, 0], { abs: 0 });
  });

  it('scales rel by |expected| and adds abs', () => {
    expect(1000.5).toBeNear(1000, { rel: 1e-3 });
    expect(1000.5).not.toBeNear(1000, { rel: 1e-4 });
    expect(1000.5).toBeNear(1000, { abs: 0.4, rel: 1e-4 });
    expect(-1000.5).toBeNear(-1000, { rel: 1e-3 });
  });
});

describe('toBeNear on arrays', () => {
  it('compares arrays, typed arrays and nested arrays element by element', () => {
    expect(new Float64Array([1, 2, 3])).toBeNear([1, 2, 3 + 1e-13], { digits: 12 });
    expect([[1, 2], new Float64Array([3, 4])]).toBeNear([[1, 2], [3, 4 + 1e-13]], { abs: 1e-12 });
  });

  it('names the worst element, its index, the difference and the tolerance used', () => {
    const message = failure(() => expect([1, 2.1, 3.01]).toBeNear([1, 2, 3], { abs: 1e-3 }));
    expect(message).toContain('within |difference| <= abs 0.001 + rel 0 * |expected|, but 2 of 3 are outside');
    expect(message).toMatch(/worst \[1\]: 2\.1 vs 2, difference 0\.1\d*, allowed 0\.001/);
  });

  it('names the index path in nested arrays', () => {
    const message = failure(() => expect([[1, 2], [3, 4]]).toBeNear([[1, 2], [3.5, 4]], { digits: 6 }));
    expect(message).toContain('worst [1][0]: 3 vs 3.5');
    expect(message).toContain('6 digits');
  });

  it('fails on a length or shape mismatch, saying where', () => {
    expect(failure(() => expect([1, 2]).toBeNear([1, 2, 3], { abs: 1 }))).toContain('has length 2, expected 3');
    expect(failure(() => expect([[1, 2], [3]]).toBeNear([[1, 2], [3, 4]], { abs: 1 }))).toContain('[1] has length 1, expected 2');
    expect(failure(() => expect([1, [2]]).toBeNear([1, 2], { abs: 1 }))).toContain('[1] is an array of length 1, expected a number');
    expect(failure(() => expect(1).toBeNear([1], { abs: 1 }))).toContain('value is 1, expected an array of length 1');
  });
});

describe('toBeNear on special values', () => {
  it('never counts NaN as near, not even NaN or with an infinite tolerance', () => {
    expect(NaN).not.toBeNear(NaN, { abs: Infinity });
    expect(NaN).not.toBeNear(NaN, { digits: 0 });
    expect(failure(() => expect([1, NaN, 5]).toBeNear([1, 2, 3], { abs: 1 }))).toContain('worst [1]: NaN vs 2');
  });

  it('counts an infinity as near only the same infinity, like toBeCloseTo and numpy.isclose', () => {
    expect([Infinity, -Infinity]).toBeNear([Infinity, -Infinity], { digits: 12 });
    expect(Infinity).not.toBeNear(-Infinity, { abs: 1 });
    expect(1e308).not.toBeNear(Infinity, { rel: 1 });
  });
});

describe('toBeNear with upToSign', () => {
  it('accepts -q for q, a quaternion and its negative being the same rotation (common practice)', () => {
    const q = [0.5, -0.5, 0.5, 0.5];
    expect(q.map((x) => -x)).toBeNear(q, { abs: 1e-15, upToSign: true });
    expect(q.map((x) => -x)).not.toBeNear(q, { abs: 1e-15 });
    expect([0.5, 0.5, 0.5, 0.5]).not.toBeNear(q, { abs: 1e-15, upToSign: true });
  });
});
