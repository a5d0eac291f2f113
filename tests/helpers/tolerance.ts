/**
 * The one tolerance matcher of the numeric tests, registered for the unit project through
 * `setupFiles` in vitest.config.ts:
 *
 *   expect(actual).toBeNear(expected, { digits: 12 })   // |a - e| < 10^-12 / 2, vitest's toBeCloseTo rule
 *   expect(actual).toBeNear(expected, { abs: 1e-12 })   // |a - e| <= abs + rel |e|, numpy.isclose's rule
 *   expect(q).toBeNear(expected, { abs: 1e-14, upToSign: true })   // q and -q are the same rotation
 *
 * Works element by element on numbers, arrays, typed arrays and nested arrays of them; the shapes
 * must agree. NaN is never near anything; an infinity is near only the same infinity (as in both
 * rules). It does not reuse the core's `equals` (vec3.ts): that one takes three components and
 * scales a single tolerance by max(1, |a|, |b|), and a check should not rest on the code it checks.
 */
import { expect } from 'vitest';

/** Allowed difference: decimal digits like toBeCloseTo, or absolute plus relative to |expected|. */
export type Tolerance = ({ digits: number; abs?: never; rel?: never } | { abs?: number; rel?: number; digits?: never }) & {
  /** Compare -actual when actual points away from expected (dot product < 0): quaternions q and -q. */
  upToSign?: boolean;
};

interface Element {
  path: string;
  actual: number;
  expected: number;
}

type Nested = number | ArrayLike<Nested>;

function isArrayLike(value: unknown): value is ArrayLike<Nested> {
  return Array.isArray(value) || (ArrayBuffer.isView(value) && !(value instanceof DataView));
}

/** Pairs the numbers of actual and expected in order; a string saying where the shapes differ otherwise. */
function pairElements(actual: unknown, expected: unknown, path: string, out: Element[]): string | undefined {
  if (typeof expected === 'number') {
    if (typeof actual !== 'number') return `${path || 'value'} is ${describeValue(actual)}, expected a number`;
    out.push({ path, actual, expected });
    return undefined;
  }
  if (!isArrayLike(expected)) return `expected value${path ? ` at ${path}` : ''} is ${describeValue(expected)}, not a number or array`;
  if (!isArrayLike(actual)) return `${path || 'value'} is ${describeValue(actual)}, expected an array of length ${expected.length}`;
  if (actual.length !== expected.length) return `${path || 'value'} has length ${actual.length}, expected ${expected.length}`;
  for (let i = 0; i < expected.length; i++) {
    const problem = pairElements(actual[i], expected[i], `${path}[${i}]`, out);
    if (problem) return problem;
  }
  return undefined;
}

function describeValue(value: unknown): string {
  if (isArrayLike(value)) return `an array of length ${value.length}`;
  return typeof value === 'number' ? String(value) : typeof value;
}

function describeTolerance(tolerance: Tolerance): string {
  if (tolerance.digits !== undefined) return `|difference| < 10^-${tolerance.digits} / 2 (${tolerance.digits} digits)`;
  return `|difference| <= abs ${tolerance.abs ?? 0} + rel ${tolerance.rel ?? 0} * |expected|`;
}

/** |a - e| against the allowed difference; NaN is never near, an infinity only the same infinity. */
function compare(element: Element, tolerance: Tolerance): { difference: number; allowed: number; pass: boolean } {
  const { actual, expected } = element;
  const difference = Math.abs(actual - expected);
  if (!Number.isFinite(actual) || !Number.isFinite(expected)) return { difference, allowed: 0, pass: actual === expected };
  if (tolerance.digits !== undefined) {
    const allowed = 10 ** -tolerance.digits / 2;
    return { difference, allowed, pass: difference < allowed };
  }
  const allowed = (tolerance.abs ?? 0) + (tolerance.rel ?? 0) * Math.abs(expected);
  return { difference, allowed, pass: difference <= allowed };
}

expect.extend({
  toBeNear(actual: unknown, expected: Nested, tolerance: Tolerance) {
    const values = () => `\n\nReceived: ${this.utils.printReceived(actual)}\nExpected: ${this.utils.printExpected(expected)}`;
    const elements: Element[] = [];
    const shapeProblem = pairElements(actual, expected, '', elements);
    if (shapeProblem) return { pass: false, message: () => `expected the same shape: ${shapeProblem}${values()}` };
    if (tolerance.upToSign && elements.reduce((dot, e) => dot + e.actual * e.expected, 0) < 0) {
      for (const e of elements) e.actual = -e.actual;
    }
    let worst: (Element & ReturnType<typeof compare>) | undefined;
    let failures = 0;
    for (const element of elements) {
      const result = compare(element, tolerance);
      if (result.pass) continue;
      failures++;
      const over = result.difference - result.allowed, worstOver = worst ? worst.difference - worst.allowed : -Infinity;
      if (!worst || (Number.isNaN(over) && !Number.isNaN(worstOver)) || over > worstOver) worst = { ...element, ...result };
    }
    const rule = describeTolerance(tolerance) + (tolerance.upToSign ? ', up to sign' : '');
    if (!worst) return { pass: true, message: () => `expected some element outside ${rule}, but all ${elements.length} are within${values()}` };
    const { path, actual: a, expected: e, difference, allowed } = worst;
    return {
      pass: false,
      message: () =>
        `expected every element within ${rule}, but ${failures} of ${elements.length} are outside; ` +
        `worst ${path || 'value'}: ${a} vs ${e}, difference ${difference}, allowed ${allowed}${values()}`,
    };
  },
});

declare module 'vitest' {
  interface Matchers<T = any> {
    /** Every number of actual within tolerance of the same-shaped expected (numbers, arrays, typed arrays, nested). */
    toBeNear(expected: Nested, tolerance: Tolerance): T;
  }
}
