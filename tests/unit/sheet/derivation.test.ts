import { describe, expect, it } from 'vitest';
import katex from 'katex';
import { deriveSheet, formatLatexNumber } from '../../../src/lib/sheet/derivation';
import { solveSheet } from '../../../src/lib/kinematics';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

describe('formatLatexNumber', () => {
  it('writes four significant digits and powers of ten outside [1e-3, 1e4)', () => {
    expect(formatLatexNumber(0.0123456)).toBe('0.01235');
    expect(formatLatexNumber(-2.5e-7)).toBe('-2.5 \\times 10^{-7}');
    expect(formatLatexNumber(123456)).toBe('1.235 \\times 10^{5}');
    expect(formatLatexNumber(0)).toBe('0');
    expect(formatLatexNumber(Infinity)).toBe('\\infty');
    expect(formatLatexNumber(Number.NaN)).toBe('\\text{NaN}');
  });
});

describe('deriveSheet', () => {
  const doc = threeFingerSheet();
  const result = solveSheet(doc);
  const entries = deriveSheet(doc, result);

  it('every entry renders with KaTeX (the renderer the product uses) without errors', () => {
    for (const e of entries) expect(() => katex.renderToString(e.latex, { throwOnError: true }), e.id).not.toThrow();
  });

  it('ids are unique and values match the result', () => {
    expect(new Set(entries.map((e) => e.id)).size).toBe(entries.length);
    const byId = new Map(entries.map((e) => [e.id, e]));
    expect(byId.get('finger.0.contact.gap')?.value).toBe(result.fingers[0].contact.gap);
    expect(byId.get('finger.1.full.rates')?.value).toEqual(Array.from(result.fingers[1].full.rates));
    expect(byId.get('finger.2.steer.rollRate')?.value).toBe(result.fingers[2].steer.rollRate);
    expect(byId.get('grasp.rank')?.value).toBe(result.grasp.rank);
  });

  it('states which Jacobian the rank is judged on, with the ratio of the result', () => {
    const rank = entries.find((e) => e.id === 'finger.0.rankRatio');
    expect(rank?.value).toBe(result.fingers[0].rankRatio);
    expect(rank?.label).toContain('after steering');
    expect(rank?.label).toContain('(base, roll)');
    const unsteered = threeFingerSheet();
    unsteered.hand.fingers[0].joints[1] = { ...unsteered.hand.fingers[0].joints[1], role: 'other' };
    const full = deriveSheet(unsteered, solveSheet(unsteered)).find((e) => e.id === 'finger.0.rankRatio');
    expect(full?.label).toContain('full Jacobian');
    expect(() => katex.renderToString(full!.latex, { throwOnError: true })).not.toThrow();
  });

  it('puts the numbers into the formula: base rate n . v / n . J_b with n . v = 0.01 m/s and gain 0.05 m/rad (worked by hand)', () => {
    const base = entries.find((e) => e.id === 'finger.0.steer.baseRates');
    expect(base?.latex).toContain('\\frac{0.01}{0.05}');
    expect(base?.latex).toContain('= 0.2');
    expect(base?.unit).toBe('rad/s');
  });

  it('covers contact, Jacobian, full and steer-and-roll numbers for every finger', () => {
    for (let i = 0; i < 3; i++) {
      for (const suffix of ['contact.gap', 'contact.rollerPoint', 'contact.objectVelocity', 'jacobian.0', 'jacobian.2', 'full.rates', 'full.residual', 'full.conditionNumber', 'full.manipulability', 'steer.baseRates', 'steer.pivotAngle', 'steer.rollRate', 'steer.rateDifference', 'steer.conditionAfter']) {
        expect(entries.some((e) => e.id === `finger.${i}.${suffix}`), `finger.${i}.${suffix}`).toBe(true);
      }
    }
  });
});
