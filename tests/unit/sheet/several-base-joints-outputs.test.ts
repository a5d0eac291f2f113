import { describe, expect, it } from 'vitest';
import katex from 'katex';
import { solveSheet, toPlainResult } from '../../../src/lib/kinematics';
import { deriveSheet } from '../../../src/lib/sheet/derivation';
import { displayValue, findOutput, listOutputs } from '../../../src/lib/sheet/outputs';
import { FINGER_COLUMNS, fingerRows, rateColumns } from '../../../src/lib/sheet/results-csv';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

/** The test hand with a second base joint on finger 0 about z through (0.04, -0.03, 0): normal gains 0.05 and -0.03 m/rad (worked by hand). */
function twoBaseSheet() {
  const doc = threeFingerSheet();
  doc.object.twist = { linear: [0.01, 0.02, 0.02], angular: [0, 0, 0] };
  doc.hand.fingers[0].joints.splice(1, 0, { name: 'base 2', role: 'base', axis: [0, 0, 1], point: [0.04, -0.03, 0], angle: 0 });
  return doc;
}

describe('a finger with two base joints on the sheet', () => {
  const doc = twoBaseSheet();
  const result = solveSheet(doc);
  const plain = toPlainResult(result);
  // Pseudo-inverse of the row a = (0.05, -0.03) m/rad times n . v = 0.01 m/s: a^T 0.01 / |a|^2 (common practice; Strang).
  const expected = [(0.05 * 0.01) / 0.0034, (-0.03 * 0.01) / 0.0034];

  it('lists one base rate per base joint, named by the joint', () => {
    const rows = listOutputs(plain).filter((row) => row.quantity.startsWith('base rate'));
    expect(rows.filter((row) => row.group === 'finger 1').map((row) => row.quantity)).toEqual([
      'base rate (steer-and-roll, minimum norm) · base', 'base rate (steer-and-roll, minimum norm) · base 2',
    ]);
    const values = rows.filter((row) => row.group === 'finger 1').map((row) => row.value as number);
    expect(values).toBeNear(expected, { digits: 13 });
    expect(rows.filter((row) => row.group === 'finger 2')).toHaveLength(1);
  });

  it('shows two base rates as a vector and a single base rate as a plain number', () => {
    const baseRates = findOutput('steer.baseRates');
    expect(displayValue(baseRates, baseRates.read(plain, 0))).toMatch(/^\(.+, .+\)$/);
    const single = displayValue(baseRates, baseRates.read(plain, 1));
    expect(single).not.toMatch(/[(),]/);
    expect(single).toBe(displayValue(baseRates, plain.fingers[1]!.steer.baseRates[0]!));
  });

  it('writes a base-rate column per base joint in the CSV, blank where a finger has fewer', () => {
    const header = [...FINGER_COLUMNS, ...rateColumns(4)];
    const rows = fingerRows(plain, 4);
    const first = header.indexOf('steer_base_rate1_rad_s'), second = header.indexOf('steer_base_rate2_rad_s');
    expect([rows[0][first], rows[0][second]]).toBeNear(expected, { digits: 13 });
    expect(rows[1][second]).toBe('');
  });

  it('derives the base rates by the minimum-norm rule, rendered by KaTeX, with the values of the result', () => {
    const entry = deriveSheet(doc, result).find((e) => e.id === 'finger.0.steer.baseRates');
    expect(entry?.label).toContain('minimum-norm');
    expect(entry?.latex).toContain('a^{+}');
    expect(entry?.value).toBeNear(expected, { digits: 13 });
    expect(() => katex.renderToString(entry!.latex, { throwOnError: true })).not.toThrow();
  });
});
