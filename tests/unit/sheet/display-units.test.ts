import { readFileSync } from 'node:fs';
import { unit as referenceUnit } from 'mathjs';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import DerivationSection from '../../../src/components/sheet/DerivationSection';
import ResultsSection from '../../../src/components/sheet/ResultsSection';
import { DEFAULT_DISPLAY_UNITS, DISPLAY_FACTORS, displayFactor, displayUnitsOf, shownUnit, toShown, type DisplayUnits } from '../../../src/lib/sheet/display-units';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { displayUnit, displayValue, findOutput, formatShownQuantity } from '../../../src/lib/sheet/outputs';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { parseQuantity, unitFactor } from '../../../src/lib/sheet/units';

const example = JSON.parse(readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const SI_BASE: DisplayUnits = { length: 'm', angle: 'rad', angularSpeed: 'rad/s' };
const OTHERS: DisplayUnits = { length: 'm', angle: 'rad', angularSpeed: 'rpm' };

describe('unitFactor (mathjs conversions)', () => {
  it('agrees with the mathjs package itself for the units a sheet shows', () => {
    // Reference: a separate, default mathjs instance (the product's is private and has rpm added).
    for (const [from, to] of [['m', 'mm'], ['m/s', 'mm/s'], ['rad', 'deg'], ['mm', 'm'], ['deg', 'rad']] as const) {
      expect(unitFactor(from, to), `${from} → ${to}`).toBeNear(referenceUnit(1, from).toNumber(to), { rel: 1e-15 });
    }
  });

  it('reads named conversions as the standards define them', () => {
    // SI brochure (9th ed.), prefix milli = 1e-3: 1 m = 1000 mm.
    expect(unitFactor('m', 'mm')).toBeNear(1000, { rel: 1e-15 });
    // SI brochure Table 8: 1° = (π/180) rad, so 1 rad = 180/π deg.
    expect(unitFactor('rad', 'deg')).toBeNear(180 / Math.PI, { rel: 1e-15 });
    // ISO 80000-3 (revolution = 2π rad) and the minute of 60 s: 1 rpm = 2π/60 rad/s.
    expect(unitFactor('rpm', 'rad/s')).toBeNear((2 * Math.PI) / 60, { rel: 1e-15 });
    expect(unitFactor('rad/s', 'rpm')).toBeNear(60 / (2 * Math.PI), { rel: 1e-15 });
    expect(parseQuantity('60 rpm', 'angularSpeed')).toEqual({ ok: true, value: expect.closeTo(2 * Math.PI, 12) });
  });

  it('is 1 between a unit and itself', () => {
    expect(unitFactor('rad/s', 'rad/s')).toBe(1);
  });
});

describe('display factors (a table, no mathjs on the page)', () => {
  it('holds every pair the display choice can give, each agreeing with the mathjs package', () => {
    // Reference: a default mathjs instance; it has no rpm, so rpm is written as the cycle per minute it is (ISO 80000-3).
    const reference = (unit: string) => unit.replace('rpm', 'cycle/min');
    const pairs = new Set<string>();
    for (const length of ['mm', 'm'] as const)
      for (const angle of ['deg', 'rad'] as const)
        for (const angularSpeed of ['rad/s', 'rpm'] as const)
          for (const si of ['m', 'm/s', 'rad', 'rad/s']) {
            const shown = shownUnit(si, { length, angle, angularSpeed });
            if (shown !== si) pairs.add(`${si} ${shown}`);
          }
    expect([...pairs].sort()).toEqual(Object.keys(DISPLAY_FACTORS).sort());
    for (const pair of pairs) {
      const [si, shown] = pair.split(' ') as [string, string];
      expect(displayFactor(si, shown), pair).toBeNear(referenceUnit(1, si).toNumber(reference(shown)), { rel: 1e-15 });
      expect(displayFactor(si, shown), pair).toBeNear(unitFactor(si, shown), { rel: 1e-15 });
    }
  });

  it('is 1 for a unit shown as itself and refuses a pair the choice never gives', () => {
    expect(displayFactor('m/s^2', 'm/s^2')).toBe(1);
    expect(() => displayFactor('m', 'in')).toThrow(RangeError);
  });
});

describe('the display-unit choice', () => {
  it('defaults to the look sheets had: mm, deg, rad/s', () => {
    expect(DEFAULT_DISPLAY_UNITS).toEqual({ length: 'mm', angle: 'deg', angularSpeed: 'rad/s' });
    expect(displayUnitsOf(example)).toEqual(DEFAULT_DISPLAY_UNITS);
    expect(displayUnitsOf(null)).toEqual(DEFAULT_DISPLAY_UNITS);
  });

  it('reads each part of the document, and the default for an unknown unit', () => {
    expect(displayUnitsOf({ display: { length: 'm', angularSpeed: 'rpm' } })).toEqual({ length: 'm', angle: 'deg', angularSpeed: 'rpm' });
    expect(displayUnitsOf({ display: { length: 'furlong', angle: 'rad' } })).toEqual({ length: 'mm', angle: 'rad', angularSpeed: 'rad/s' });
  });

  it('maps lengths, speeds, angles and angular speeds; leaves every other unit alone', () => {
    expect(['m', 'm/s', 'rad', 'rad/s'].map((u) => shownUnit(u, OTHERS))).toEqual(['m', 'm/s', 'rad', 'rpm']);
    expect(['m', 'm/s', 'rad', 'rad/s'].map((u) => shownUnit(u, DEFAULT_DISPLAY_UNITS))).toEqual(['mm', 'mm/s', 'deg', 'rad/s']);
    expect(shownUnit('m/s^2', OTHERS)).toBe('m/s^2');
    expect(toShown(3, 'm/rad', DEFAULT_DISPLAY_UNITS)).toBe(3);
    // 1 rad/s = 60/(2π) rpm ≈ 9.5493 rpm (ISO 80000-3).
    expect(toShown(1, 'rad/s', OTHERS)).toBeNear(60 / (2 * Math.PI), { rel: 1e-15 });
  });

  it('is part of the sheet document: read with defaults, refused with a located message when unknown', () => {
    const read = parseSheet({ ...example, display: { angularSpeed: 'rpm' } });
    expect(read.ok && read.doc.display).toEqual({ length: 'mm', angle: 'deg', angularSpeed: 'rpm' });
    const plain = parseSheet(example);
    expect(plain.ok && plain.doc.display).toBeUndefined();
    const bad = parseSheet({ ...example, display: { length: 'in' } });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.issues).toEqual([{ path: 'display.length', message: 'expected one of "mm", "m"' }]);
  });
});

describe('numbers in the chosen units', () => {
  const evaluated = evaluateSheet({ ...example, display: OTHERS }, { derive: true });
  if (!evaluated.ok) throw new Error(evaluated.error.message);
  const { result, derivation } = evaluated.value;

  it('converts catalogue outputs: the default keeps mm and degrees, the choice gives m, rad and rpm', () => {
    const gap = findOutput('contact.gap');
    expect(displayValue(gap, 0.0012346)).toBe('1.235');
    expect(displayValue(gap, 0.0012346, SI_BASE)).toBe('0.001235');
    expect(displayUnit(gap, SI_BASE)).toBe('m');
    expect(displayValue(findOutput('steer.pivotAngle'), Math.PI / 2, SI_BASE)).toBe('1.571');
    // 2π rad/s is one turn per second, 60 rpm.
    expect(displayValue(findOutput('full.rates'), [2 * Math.PI, -Math.PI], OTHERS)).toBe('(60, -30)');
    expect(displayUnit(findOutput('full.rates'), OTHERS)).toBe('rpm');
  });

  it('the results table follows the choice, and its caption names the units', () => {
    const html = renderToStaticMarkup(createElement(ResultsSection, { result, stale: false, units: OTHERS }));
    const rate = result.fingers[0].full.rates[0];
    expect(html).toContain(`data-result="0.full.rates.0">${displayValue(findOutput('full.rates'), rate, OTHERS)}</td>`);
    expect(html).toContain(`data-result="0.contact.gap">${displayValue(findOutput('contact.gap'), result.fingers[0].contact.gap, OTHERS)}</td><td class="result-unit">m</td>`);
    expect(html).toContain('joint rates, rpm, and angles, rad');
  });

  it('the derivation shows each value in the chosen unit beside its SI formula', () => {
    const entry = derivation.find((e) => e.id === 'finger.0.contact.gap')!;
    expect(formatShownQuantity(entry.value, entry.unit, DEFAULT_DISPLAY_UNITS)).toBe(`${displayValue(findOutput('contact.gap'), entry.value as number)} mm`);
    expect(formatShownQuantity([1, 2], '1')).toBe('(1, 2)');
    const html = renderToStaticMarkup(createElement(DerivationSection, { entries: derivation, fingerNames: ['left', 'right'], units: SI_BASE }));
    expect(html).toContain(`data-derivation-value="true">${formatShownQuantity(entry.value, 'm', SI_BASE)}</span>`);
    expect(html).toContain('(formula in SI, m)');
  });
});
