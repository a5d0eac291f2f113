import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { computeSheetGraspQuality, sheetCurvature, solveAccelerations, solveSheet, toPlainResult } from '../../../src/lib/kinematics';
import { checkDocument } from '../../../src/lib/server/sheets';
import { exportResultsCsv, readSheetFile } from '../../../src/lib/server/sheet-files';
import { commandedRates } from '../../../src/lib/sheet/commanded';
import { deriveSheet } from '../../../src/lib/sheet/derivation';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { computeSheet } from '../../../src/workers/compute-protocol';

// The schema keeps every document the core cannot solve out (finger and joint limits, finite
// numbers), so a failing core is stood in for: solveSheet throws while `failure` is set.
// `tamper` stands in for a core that overflows: it may change the solved result before it is returned.
const control = vi.hoisted(() => ({ failure: null as unknown, tamper: null as null | ((result: import('../../../src/lib/kinematics').SheetResult) => void) }));
vi.mock('../../../src/lib/kinematics', async (importOriginal) => {
  const core = await importOriginal<typeof import('../../../src/lib/kinematics')>();
  return {
    ...core,
    solveSheet: (...args: Parameters<typeof core.solveSheet>) => {
      if (control.failure !== null) throw control.failure;
      const solved = core.solveSheet(...args);
      control.tamper?.(solved);
      return solved;
    },
  };
});

afterEach(() => {
  control.failure = null;
  control.tamper = null;
});

const text = readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8');
const sheet = () => JSON.parse(text) as Record<string, unknown> & { hand: { fingers: { roller: { radius: unknown } }[] } };

describe('evaluateSheet', () => {
  it('reads, solves and summarises a document as written, the same as the core step by step', () => {
    const evaluated = evaluateSheet(sheet());
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const parsed = parseSheet(sheet());
    if (!parsed.ok) throw new Error('the example must read');
    const unaccelerated = solveSheet(parsed.doc);
    const curvatures = sheetCurvature(parsed.doc, unaccelerated);
    const solved = solveAccelerations(unaccelerated, parsed.doc.object.acceleration, parsed.doc.solver, curvatures, parsed.doc.hand.fingers);
    solved.graspQuality = computeSheetGraspQuality(parsed.doc, solved);
    expect(evaluated.value.doc).toEqual(parsed.doc);
    const plain = toPlainResult(solved);
    curvatures.forEach((curvature, i) => { plain.fingers[i].curvature = curvature; });
    plain.commanded = commandedRates(parsed.doc, plain);
    expect(evaluated.value.result).toEqual(plain);
    expect(evaluated.value.summary).toEqual({
      fingers: parsed.doc.hand.fingers.length,
      worst: solved.worstSeverity,
      warningCodes: [...new Set(solved.warnings.map((w) => w.code))].sort(),
      warningCount: solved.warnings.length,
    });
    expect('derivation' in evaluated.value).toBe(false);
  });

  it('derives every reported number only when asked', () => {
    const evaluated = evaluateSheet(sheet(), { derive: true });
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const parsed = parseSheet(sheet());
    if (!parsed.ok) throw new Error('the example must read');
    const solved = solveSheet(parsed.doc);
    solveAccelerations(solved, parsed.doc.object.acceleration, parsed.doc.solver, sheetCurvature(parsed.doc, solved), parsed.doc.hand.fingers);
    solved.graspQuality = computeSheetGraspQuality(parsed.doc, solved);
    expect(evaluated.value.derivation).toEqual(deriveSheet(parsed.doc, solved));
  });

  it('answers every located issue of a document that does not read, at the document stage', () => {
    const doc = sheet();
    doc.hand.fingers[0].roller.radius = '30 deg';
    const evaluated = evaluateSheet(doc);
    expect(evaluated).toEqual({
      ok: false,
      error: {
        kind: 'invalid',
        stage: 'document',
        message: 'expected a length, got 30 deg',
        issues: [{ path: 'hand.fingers[0].roller.radius', message: 'expected a length, got 30 deg' }],
      },
    });
    expect(evaluateSheet(null)).toMatchObject({ ok: false, error: { stage: 'document', issues: [{ path: '(document)' }] } });
  });

  it('turns a solve that throws into a reported error at the document root instead of throwing', () => {
    control.failure = new RangeError('3 x 13 matrix exceeds workspace 6 x 12');
    const message = 'the sheet could not be solved: 3 x 13 matrix exceeds workspace 6 x 12';
    expect(evaluateSheet(sheet(), { derive: true })).toEqual({
      ok: false,
      error: { kind: 'invalid', stage: 'solve', message, issues: [{ path: '(document)', message }] },
    });
    control.failure = 'not an Error';
    expect(evaluateSheet(sheet())).toMatchObject({ ok: false, error: { stage: 'solve', message: 'the sheet could not be solved: not an Error' } });
  });

  it('lets every caller report a thrown solve: worker, sheet service, file import and CSV export', () => {
    control.failure = new Error('no basis');
    const issue = { path: '(document)', message: 'the sheet could not be solved: no basis' };
    expect(computeSheet({ type: 'compute', id: 4, document: sheet() }, () => 0)).toEqual({ type: 'computed', id: 4, ok: false, issues: [issue], readings: expect.any(Object), elapsedMs: 0 });
    expect(checkDocument(sheet())).toMatchObject({ ok: false, error: { kind: 'invalid', message: issue.message, path: 'document.(document)', issues: [issue] } });
    expect(readSheetFile(text)).toEqual({ ok: false, stage: 'document', issues: [{ ...issue, line: 1, column: 1 }] });
    expect(exportResultsCsv(sheet())).toEqual({ ok: false, issues: [issue] });
  });
});

describe('evaluateSheet never reports a non-finite number', () => {
  it('refuses a result holding NaN, naming the output, the finger and the joint', () => {
    control.tamper = (solved) => {
      solved.fingers[0]!.full.rates[2] = Number.NaN;
    };
    const evaluated = evaluateSheet(sheet());
    expect(evaluated.ok).toBe(false);
    if (evaluated.ok) return;
    const finger = (sheet() as unknown as { hand: { fingers: { name: string; joints: { name: string }[] }[] } }).hand.fingers[0]!;
    expect(evaluated.error.stage).toBe('solve');
    expect(evaluated.error.message).toContain('fingers[0].full.rates[2] is NaN');
    expect(evaluated.error.message).toContain(`finger "${finger.name}", joint "${finger.joints[2]!.name}"`);
    expect(evaluated.error.issues).toEqual([{ path: '(document)', message: evaluated.error.message }]);
  });

  it('refuses an infinite residual, naming the finger', () => {
    control.tamper = (solved) => {
      solved.fingers[0]!.full.residual[0] = Number.POSITIVE_INFINITY;
    };
    const evaluated = evaluateSheet(sheet());
    expect(evaluated.ok).toBe(false);
    if (evaluated.ok) return;
    const finger = (sheet() as unknown as { hand: { fingers: { name: string }[] } }).hand.fingers[0]!;
    expect(evaluated.error.message).toContain(`fingers[0].full.residual[0] is Infinity (finger "${finger.name}")`);
  });

  it('keeps an infinite condition number (rank lost) but refuses a negative infinite one', () => {
    control.tamper = (solved) => {
      solved.fingers[0]!.full.conditionNumber = Number.POSITIVE_INFINITY;
    };
    expect(evaluateSheet(sheet()).ok).toBe(true);
    control.tamper = (solved) => {
      solved.fingers[0]!.full.conditionNumber = Number.NEGATIVE_INFINITY;
    };
    expect(evaluateSheet(sheet()).ok).toBe(false);
  });
});
