/**
 * The evaluation's caches are exact: a reading answered from a cache equals the reading computed anew by the uncached
 * functions (the reference here), whatever was read before, and no caller can change what the next one gets.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { computeGraspQuality, sheetGraspQualityInput, solveSheet } from '../../../src/lib/kinematics/index';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { sheetGraspQuality } from '../../../src/lib/sheet/grasp-quality-cache';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { createExpressionBudget, MAX_SHEET_OPERATIONS, parseQuantity, parseVariables, readSheetVariables } from '../../../src/lib/sheet/units';

const demoText = readFileSync('content/sheets/line4-bearing-housing-quarter-turn.json', 'utf8');
const demo = (): Record<string, any> => JSON.parse(demoText);

function solvedDemo(edit: (doc: Record<string, any>) => void = () => {}) {
  const raw = demo();
  edit(raw);
  const parsed = parseSheet(raw);
  if (!parsed.ok) throw new Error(parsed.issues[0]!.message);
  return { doc: parsed.doc, solved: solveSheet(parsed.doc) };
}

describe('grasp quality cache', () => {
  it('answers what computeGraspQuality computes for the same contacts, first and again', () => {
    const { doc, solved } = solvedDemo();
    const reference = computeGraspQuality(sheetGraspQualityInput(doc, solved));
    expect(sheetGraspQuality(doc, solved)).toEqual(reference);
    expect(sheetGraspQuality(doc, solved)).toEqual(reference);
  });

  it('computes anew when a contact moves or the friction changes', () => {
    const moved = solvedDemo((d) => { d.hand.fingers[0].joints[0].angle = '2 deg'; });
    const slippery = solvedDemo((d) => { d.hand.fingers[1].friction = 0.2; });
    sheetGraspQuality(solvedDemo().doc, solvedDemo().solved);
    for (const { doc, solved } of [moved, slippery]) {
      expect(sheetGraspQuality(doc, solved)).toEqual(computeGraspQuality(sheetGraspQualityInput(doc, solved)));
    }
    expect(sheetGraspQuality(slippery.doc, slippery.solved).sumQuality).not.toBe(sheetGraspQuality(moved.doc, moved.solved).sumQuality);
  });

  it('computes anew when only the torque length is stated (twice the length the sheet takes when it states none)', () => {
    const unstated = solvedDemo();
    const defaultLength = computeGraspQuality(sheetGraspQualityInput(unstated.doc, unstated.solved)).torqueLength;
    sheetGraspQuality(unstated.doc, unstated.solved);
    const { doc, solved } = solvedDemo((d) => { d.graspQuality = { torqueLength: defaultLength * 2 }; });
    const reference = computeGraspQuality(sheetGraspQualityInput(doc, solved));
    expect(reference.torqueLength).toBe(defaultLength * 2);
    expect(sheetGraspQuality(doc, solved)).toEqual(reference);
  });

  it('hands out a copy: changing one answer leaves the next as computed', () => {
    const { doc, solved } = solvedDemo();
    const first = sheetGraspQuality(doc, solved);
    const wrench = Array.from(first.weakestWrench);
    first.weakestWrench[0] = 123;
    expect(Array.from(sheetGraspQuality(doc, solved).weakestWrench)).toEqual(wrench);
  });
});

describe('evaluateSheet read again', () => {
  it('gives the same evaluation for a new copy of a document it has read, and for the edits around it', () => {
    const first = evaluateSheet(demo());
    const edited = demo();
    edited.hand.fingers[2].roller.radius = '12.5 mm';
    evaluateSheet(edited);
    expect(evaluateSheet(demo())).toEqual(first);
  });
});

describe('readSheetVariables (a sheet variables text read once)', () => {
  const text = ['rollerRadius = 14 mm', 'gap = rollerRadius / 7', 'spin = 2*pi rad/s', 'bad = 3 furlongz'].join('\n');

  it('reads what parseVariables reads and spends the same share of a new sheet budget, every time', () => {
    const referenceBudget = createExpressionBudget();
    const reference = parseVariables(text, referenceBudget);
    for (let round = 0; round < 2; round++) {
      const budget = createExpressionBudget();
      const read = readSheetVariables(text, budget);
      expect(read).toEqual(reference);
      expect(budget.remaining).toBe(referenceBudget.remaining);
      expect(budget.remaining).toBeLessThan(MAX_SHEET_OPERATIONS);
    }
  });

  it('reads a quantity over its sealed values as over the same values freshly read (14 mm / 7 = 2 mm, plain arithmetic)', () => {
    const sealed = readSheetVariables(text, createExpressionBudget()).values;
    const fresh = parseVariables(text).values;
    for (let round = 0; round < 2; round++) {
      expect(parseQuantity('gap + 1 mm', 'length', sealed)).toEqual(parseQuantity('gap + 1 mm', 'length', fresh));
      expect(parseQuantity('gap + 1 mm', 'angle', sealed)).toEqual(parseQuantity('gap + 1 mm', 'angle', fresh));
    }
    expect(parseQuantity('gap + 1 mm', 'length', sealed)).toMatchObject({ ok: true, value: expect.closeTo(0.003, 12) });
  });

  it('reads on a budget already drawn on as parseVariables does', () => {
    const drawn = { remaining: 3 };
    const reference = { remaining: 3 };
    expect(readSheetVariables(text, drawn)).toEqual(parseVariables(text, reference));
    expect(drawn.remaining).toBe(reference.remaining);
  });
});

describe('parseQuantity read again over variables that may still change', () => {
  it('follows each value of the same scope object (1 mm = 1e-3 m, SI Brochure, 9th ed., Table 7)', () => {
    const scope = parseVariables('probe = 1 mm').values;
    expect(parseQuantity('probe * 2', 'length', scope)).toMatchObject({ ok: true, value: expect.closeTo(0.002, 12) });
    scope.set('probe', parseVariables('probe = 5 mm').values.get('probe')!);
    expect(parseQuantity('probe * 2', 'length', scope)).toMatchObject({ ok: true, value: expect.closeTo(0.01, 12) });
  });
});
