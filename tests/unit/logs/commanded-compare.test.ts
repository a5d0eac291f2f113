import { describe, expect, it } from 'vitest';
import { runSheet } from '../../../src/lib/kinematics/index';
import { compareLog } from '../../../src/lib/logs/compare';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { generatedRun, logText } from './generated-log';

const base = generatedRun(120);

/** The log a controller writes when it follows the sheet's run under `commanded`, the first pivot starting 0.2 rad off so that steering turns it. */
function logUnder(commanded: SheetDocument['commanded']) {
  const doc: SheetDocument = { ...structuredClone(base.doc), commanded };
  doc.hand.fingers[0]!.joints.find((joint) => joint.role === 'pivot')!.angle = 0.2;
  const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: 120, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
  return { doc, text: logText({ ...base, doc, record }) };
}

async function largestRateResidual(doc: SheetDocument, text: string) {
  const result = await compareLog(doc, base.mapping, text);
  if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
  return { solution: result.value.solution, max: Math.max(...result.value.joints.map((j) => j.max)) };
}

describe('the log comparison follows the commanded solution', () => {
  it('re-solves the full solution for a sheet commanding "full": a log of its own full-solution run matches to rounding, and names the solution', async () => {
    const full = logUnder('full');
    const compared = await largestRateResidual(full.doc, full.text);
    expect(compared.solution).toBe('full');
    expect(compared.max).toBeLessThan(1e-9);
  });

  it('tells the two solutions apart: the same full-solution log against a sheet commanding steer-and-roll is far outside the rate tolerance', async () => {
    const full = logUnder('full');
    const compared = await largestRateResidual({ ...full.doc, commanded: 'steer-and-roll' }, full.text);
    expect(compared.solution).toBe('steer-and-roll');
    expect(compared.max).toBeGreaterThan(base.mapping.tolerances.rate);
  });
});
