import { describe, expect, it } from 'vitest';
import { compareLog, type LogComparison } from '../../../src/lib/logs/compare';
import { anyDifference, formatValue, NOISE_SHARE, sideBySide } from '../../../src/lib/view/comparison-side-by-side';
import { generatedRun, logText } from '../logs/generated-log';

const run = generatedRun(200);
const FAULTY = 'southeast-base';
const OFFSET = 0.4;

async function compared(text: string): Promise<LogComparison> {
  const outcome = await compareLog(run.doc, run.mapping, text, { plotBuckets: 16 });
  if (!outcome.ok) throw new Error(outcome.error.message);
  return outcome.value;
}

const column = run.header.indexOf(`${FAULTY}.commanded`);
const clean = await compared(logText(run));
// A commanded-rate offset on one joint over ticks 50 to 99: a quarter of the 200 samples outside tolerance.
const faulty = await compared(logText(run, (row, tick) => {
  if (tick >= 50 && tick < 100) row[column]! += OFFSET;
}));

describe('formatValue', () => {
  it('shows four significant digits and a dash for no value', () => {
    expect(formatValue(0.123456)).toBe('0.1235');
    expect(formatValue(12345.6)).toBe('12350');
    expect(formatValue(null)).toBe('—');
    expect(formatValue(NaN)).toBe('—');
  });
});

describe('sideBySide', () => {
  it('marks only the joint with the injected fault as worse, by the injected offset, and the verdict as worse', () => {
    const view = sideBySide({ revision: 1, result: clean }, { revision: 2, result: faulty });
    expect(view.left).toEqual({ revision: 1, withinTolerance: true });
    expect(view.right).toEqual({ revision: 2, withinTolerance: false });
    expect(view.verdict).toBe('worse');
    const joint = view.joints.find((j) => j.name === FAULTY)!;
    expect(joint.max.change).toBe('worse');
    expect(joint.max.right).toBeCloseTo(OFFSET, 9);
    // RMS of a residual that is OFFSET on a quarter of the samples and zero elsewhere: OFFSET * sqrt(1/4).
    expect(joint.rms.right).toBeCloseTo(OFFSET / 2, 9);
    expect(joint.within).toMatchObject({ left: 1, right: 0.75, change: 'worse' });
    for (const other of view.joints.filter((j) => j.name !== FAULTY)) {
      expect([other.rms.change, other.max.change, other.within.change], other.name).toEqual(['same', 'same', 'same']);
    }
    expect(view.contacts.every((c) => c.max.change === 'same')).toBe(true);
    expect(anyDifference(view)).toBe(true);
  });

  it('reads the other way round as better, and a comparison against itself as no difference', () => {
    const view = sideBySide({ revision: 2, result: faulty }, { revision: 3, result: clean });
    expect(view.verdict).toBe('better');
    expect(view.joints.find((j) => j.name === FAULTY)!.rms.change).toBe('better');
    expect(anyDifference(sideBySide({ revision: 1, result: clean }, { revision: 1, result: clean }))).toBe(false);
  });

  it('pairs joints and contacts by name, keeping those only one side compared, and shows slip in mm/s', () => {
    const fewer: LogComparison = {
      ...clean,
      joints: clean.joints.slice(1),
      contacts: clean.contacts.map((c, i) => (i === 0 ? { ...c, computed: false, reason: 'no measured rate' } : c)),
    };
    const view = sideBySide({ revision: 1, result: clean }, { revision: 2, result: fewer });
    expect(view.joints.map((j) => j.name)).toEqual(clean.joints.map((j) => j.joint));
    expect(view.joints[0]!.rms.change).toBe('only-left');
    expect(view.contacts[0]!.max).toEqual({ left: clean.contacts[0]!.max * 1000, right: null, change: 'only-left' });
    expect(view.contacts[1]!.max.left).toBeCloseTo(clean.contacts[1]!.max * 1000, 12);
    const back = sideBySide({ revision: 2, result: fewer }, { revision: 1, result: clean });
    expect(back.joints.at(-1)!.name).toBe(clean.joints[0]!.joint);
    expect(back.joints.at(-1)!.max.change).toBe('only-right');
  });

  it('takes a difference within a thousandth of the tolerance as rounding, not a change (residuals of 1e-17 rad/s against a 0.05 rad/s tolerance)', () => {
    const tolerance = clean.tolerances.rate;
    const nudged = (by: number): LogComparison => ({ ...clean, joints: clean.joints.map((j, i) => (i === 0 ? { ...j, rms: j.rms + by, max: j.max + by } : j)) });
    const small = sideBySide({ revision: 1, result: clean }, { revision: 2, result: nudged(tolerance * NOISE_SHARE * 0.5) });
    expect([small.joints[0]!.rms.change, small.joints[0]!.max.change]).toEqual(['same', 'same']);
    const large = sideBySide({ revision: 1, result: clean }, { revision: 2, result: nudged(tolerance * NOISE_SHARE * 2) });
    expect([large.joints[0]!.rms.change, large.joints[0]!.max.change]).toEqual(['worse', 'worse']);
  });
});
