import { readFileSync } from 'node:fs';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import WarningBadge from '../../../src/components/sheets/WarningBadge';
import PadSection from '../../../src/components/sheet/PadSection';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { lengthNote, PLAUSIBLE_LENGTHS } from '../../../src/lib/sheet/plausibility';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { warningBadgeText } from '../../../src/lib/sheet/summary';
import { describeWarning } from '../../../src/lib/sheet/warning-notes';

type Doc = { hand: { fingers: { joints: Record<string, unknown>[] }[] } } & Record<string, unknown>;
const example = JSON.parse(readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8')) as Doc;
const turning = JSON.parse(readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8')) as Doc;
const fingers = [{ name: 'left', jointNames: ['left-base', 'left-pivot', 'left-roll'] }];

/** A three-finger sheet whose rollers turn, with a rate limit of `limit` on every roll joint: each finger raises RATE_LIMIT_EXCEEDED once. */
function withRollRateLimit(limit: string | number): Doc {
  const doc = structuredClone(turning);
  for (const finger of doc.hand.fingers) finger.joints[2].rateLimit = limit;
  return doc;
}

describe('describeWarning', () => {
  const near = { code: 'CONTACT_NEAR_ROLL_AXIS', severity: 'caution', finger: 0, joint: 2, message: 'm', value: 0.0004, threshold: 0.001 } as const;

  it('names finger and joint, and gives value and threshold in the display unit', () => {
    // SI prefix milli (SI brochure): 0.0004 m = 0.4 mm, 0.001 m = 1 mm.
    expect(describeWarning(near, fingers)).toMatchObject({ where: 'finger "left", joint "left-roll"', value: '0.4 mm', threshold: '1 mm', finger: 'left', joint: 'left-roll' });
    expect(describeWarning(near, fingers, { length: 'm', angle: 'deg', angularSpeed: 'rad/s' })).toMatchObject({ value: '0.0004 m', threshold: '0.001 m' });
  });

  it('reads a ratio bare, a grasp warning as the grasp, and says what value and threshold are', () => {
    const grasp = describeWarning({ code: 'GRASP_RANK_DEFICIENT', severity: 'caution', finger: undefined, joint: undefined, message: 'm', value: 5, threshold: 6 }, fingers);
    expect(grasp).toMatchObject({ where: 'grasp', value: '5', threshold: '6', finger: null, joint: null });
    expect(grasp.thresholdMeaning).toMatch(/^6, the rank/);
  });

  it('states a raised rate limit with the judged rate, in rpm when the sheet shows rpm', () => {
    const evaluated = evaluateSheet({ ...withRollRateLimit('0.001 rad/s'), display: { angularSpeed: 'rpm' } });
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { result, doc } = evaluated.value;
    const raised = result.warnings.filter((w) => w.code === 'RATE_LIMIT_EXCEEDED');
    expect(raised.map((w) => [w.finger, w.joint])).toEqual([[0, 2], [1, 2], [2, 2]]);
    const note = describeWarning(raised[0], result.fingers, doc.display);
    // The judged rate is the larger magnitude of the full and steer-and-roll rates (warnings catalogue); 1 rad/s = 60/(2π) rpm (ISO 80000-3).
    const judged = Math.max(Math.abs(result.fingers[0].full.rates[2]), Math.abs(result.fingers[0].steer.rates[2]));
    expect(Number(note.value.replace(' rpm', ''))).toBeNear((judged * 60) / (2 * Math.PI), { rel: 1e-3 });
    expect(note.threshold).toBe(`${Number(((0.001 * 60) / (2 * Math.PI)).toPrecision(4))} rpm`);
    expect(note.where).toBe('finger "north", joint "north-roll"');
  });

  it('shows where, value and threshold in the margin note', () => {
    const html = renderToStaticMarkup(createElement(PadSection, { id: 'hand', number: 2, title: 'Hand', warnings: [describeWarning(near, fingers)], children: null }));
    expect(html).toContain('data-warning-where="true">finger &quot;left&quot;, joint &quot;left-roll&quot;</span>');
    expect(html).toContain('data-warning-value="true">0.4 mm</dd>');
    expect(html).toContain('data-warning-threshold="true">1 mm</dd>');
  });
});

describe('the warning badge', () => {
  it('counts raised warnings, not distinct codes: one code at three fingers counts three', () => {
    const evaluated = evaluateSheet(withRollRateLimit('0.001 rad/s'));
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { summary, result } = evaluated.value;
    expect(summary.warningCount).toBe(result.warnings.length);
    const rateWarnings = result.warnings.filter((w) => w.code === 'RATE_LIMIT_EXCEEDED').length;
    expect(rateWarnings).toBe(3);
    expect(summary.warningCount).toBeGreaterThan(summary.warningCodes.length);
    const badge = warningBadgeText(summary.worst, summary.warningCount);
    expect(badge.text).toBe(`${badge.label} ${result.warnings.length}`);
    const html = renderToStaticMarkup(createElement(WarningBadge, { worst: summary.worst, count: summary.warningCount, codes: summary.warningCodes }));
    expect(html).toContain(`data-warning-count="${result.warnings.length}"`);
  });

  it('reads "clean" without warnings and leaves out a count it does not know', () => {
    expect(warningBadgeText('none', 0).text).toBe('clean');
    expect(warningBadgeText('caution', undefined)).toEqual({ worst: 'caution', label: 'caution', count: null, text: 'caution' });
    expect(warningBadgeText('singular', 3).text).toBe('singular 3');
  });
});

describe('implausible lengths', () => {
  it('notes a roller radius of 85 m written as a bare number, and suggests millimetres', () => {
    expect(lengthNote(85, 'roller', true)).toBe('85000 mm is implausible for a roller radius or half width (expected 1 mm to 100 mm). A bare number is read as metres: did you mean 85 mm?');
    expect(lengthNote(85, 'roller', false, { length: 'm', angle: 'deg', angularSpeed: 'rad/s' })).toBe('85 m is implausible for a roller radius or half width (expected 0.001 m to 0.1 m).');
  });

  it('says nothing inside the range, at zero, and notes a too-small size', () => {
    expect(lengthNote(0.014, 'roller', true)).toBeNull();
    expect(lengthNote(-0.3, 'hand', true)).toBeNull();
    expect(lengthNote(0, 'object', false)).toBeNull();
    expect(lengthNote(0.0002, 'roller', false)).toMatch(/^0\.2 mm is implausible/);
    expect(PLAUSIBLE_LENGTHS.hand.max).toBe(1);
  });

  it('states the ranges in content/docs/units.md', () => {
    const text = readFileSync(new URL('../../../content/docs/units.md', import.meta.url), 'utf8');
    for (const range of Object.values(PLAUSIBLE_LENGTHS)) expect(text).toContain(range.what);
    expect(text).toContain('1 mm to 100 mm');
    expect(text).toContain('1 mm to 500 mm');
    expect(text).toContain('at most 1 m');
  });
});

describe('added limits start empty', () => {
  it('an empty rate limit or joint limit is a located "required", not a value', () => {
    const doc = structuredClone(example);
    doc.hand.fingers[0].joints[1].rateLimit = '';
    doc.hand.fingers[1].joints[0].limits = { min: '', max: '' };
    const read = parseSheet(doc);
    expect(read.ok).toBe(false);
    if (!read.ok) {
      expect(read.issues).toEqual([
        { path: 'hand.fingers[0].joints[1].rateLimit', message: 'required field is missing' },
        { path: 'hand.fingers[1].joints[0].limits.min', message: 'required field is missing' },
        { path: 'hand.fingers[1].joints[0].limits.max', message: 'required field is missing' },
      ]);
    }
  });

  it('added run noise without values is required field by field', () => {
    const doc = structuredClone(example) as Doc & { motion: { run?: Record<string, unknown> } };
    doc.motion = { ...(doc.motion as object), run: { ...(doc.motion.run ?? {}), noise: {} } };
    const read = parseSheet(doc);
    expect(read.ok).toBe(false);
    if (!read.ok) expect(read.issues.map((i) => [i.path, i.message])).toEqual([
      ['motion.run.noise.seed', 'required field is missing'],
      ['motion.run.noise.position', 'required field is missing'],
      ['motion.run.noise.angle', 'required field is missing'],
    ]);
  });
});
