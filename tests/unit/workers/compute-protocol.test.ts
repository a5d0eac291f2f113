import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { computeSheet, computeSheetInSteps } from '../../../src/workers/compute-protocol';

const sheet = () => JSON.parse(readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8'));

describe('computeSheet (the compute worker protocol)', () => {
  it('answers a request with the parsed SI document, JSON-ready results and derivation, echoing the id', () => {
    const reply = computeSheet({ type: 'compute', id: 7, document: sheet() });
    expect(reply).toMatchObject({ type: 'computed', id: 7, ok: true });
    if (reply.type !== 'computed' || !reply.ok) throw new Error('expected results');
    expect(reply.result.fingers).toHaveLength(3);
    expect(Array.isArray(reply.result.fingers[0].full.rates)).toBe(true);
    expect(reply.document.hand.fingers[0].roller.radius).toBeCloseTo(0.012, 15);
    expect(reply.derivation?.some((e) => e.id === 'finger.0.contact.gap')).toBe(true);
    expect(reply.elapsedMs).toBeGreaterThanOrEqual(0);
    // Everything must survive structured cloning into the page.
    expect(structuredClone(reply)).toEqual(reply);
  });

  it('leaves the derivation out when the page does not ask for it, with the same results', () => {
    const derived = computeSheet({ type: 'compute', id: 4, document: sheet() });
    const plain = computeSheet({ type: 'compute', id: 5, document: sheet(), derive: false });
    if (derived.type !== 'computed' || !derived.ok || plain.type !== 'computed' || !plain.ok) throw new Error('expected results');
    expect(plain.derivation).toBeUndefined();
    expect(derived.derivation?.length).toBeGreaterThan(0);
    expect(plain.result).toEqual(derived.result);
    expect(computeSheet({ type: 'compute', id: 6, document: sheet(), derive: 'yes' })).toMatchObject({ type: 'refused' });
  });

  it('recomputes with variables: a larger roller radius closes the gap by the difference', () => {
    const before = computeSheet({ type: 'compute', id: 1, document: sheet() });
    const doc = sheet();
    doc.variables = 'rollerRadius = 12 mm';
    doc.hand.fingers[0].roller.radius = 'rollerRadius + 4 mm';
    const after = computeSheet({ type: 'compute', id: 2, document: doc });
    if (before.type !== 'computed' || !before.ok || after.type !== 'computed' || !after.ok) throw new Error('expected results');
    expect(after.result.fingers[0].contact.gap - before.result.fingers[0].contact.gap).toBeCloseTo(-0.004, 9);
  });

  it('reports located issues instead of results when the sheet does not read', () => {
    const doc = sheet();
    doc.variables = 'ok = 1 mm\nbad = 2 +';
    doc.hand.fingers[1].roller.radius = '30 deg';
    const reply = computeSheet({ type: 'compute', id: 3, document: doc }, () => 0);
    expect(reply).toEqual({
      type: 'computed',
      id: 3,
      ok: false,
      elapsedMs: 0,
      issues: [
        { path: 'variables', line: 2, column: expect.any(Number), message: expect.stringMatching(/^line 2: /) },
        { path: 'hand.fingers[1].roller.radius', message: 'expected a length, got 30 deg' },
      ],
    });
  });

  it('refuses messages that are not compute requests', () => {
    expect(computeSheet({ type: 'run', id: 1 })).toMatchObject({ type: 'refused' });
    expect(computeSheet(null)).toMatchObject({ type: 'refused' });
    expect(computeSheet({ type: 'compute', id: 1.5, document: {} })).toMatchObject({ type: 'refused' });
  });
});

describe('computeSheetInSteps (the grasp quality of new contacts in a second reply)', () => {
  // The reference is computeSheet's one complete reply: the steps must end in the same results.
  const moved = (angle: string) => {
    const doc = sheet();
    doc.hand.fingers[0].joints[0].angle = angle;
    return doc;
  };
  const withoutTime = (reply: unknown) => ({ ...(reply as Record<string, unknown>), elapsedMs: 0 });

  it('answers new contacts first without the grasp quality, then with it, as computeSheet answers', () => {
    const steps = computeSheetInSteps({ type: 'compute', id: 11, document: moved('0.0125 deg'), derive: false });
    if (steps.first.type !== 'computed' || !steps.first.ok || !steps.later) throw new Error('expected results and a second reply');
    expect(steps.first.result.graspQuality).toBeUndefined();
    expect(steps.first.graspQualityPending).toBe(true);
    const complete = steps.later();
    expect(structuredClone(complete)).toEqual(complete);
    const reference = computeSheet({ type: 'compute', id: 11, document: moved('0.0125 deg'), derive: false });
    expect(withoutTime(complete)).toEqual(withoutTime(reference));
    const { graspQuality, ...rest } = (complete as { result: Record<string, unknown> }).result;
    expect(graspQuality).toMatchObject({ contactCount: 3 });
    expect(rest).toEqual(steps.first.result);
  });

  it('answers at once, complete, for contacts seen before and whenever the derivation is asked for', () => {
    computeSheet({ type: 'compute', id: 12, document: moved('0.015 deg'), derive: false });
    const seen = computeSheetInSteps({ type: 'compute', id: 13, document: moved('0.015 deg'), derive: false });
    expect(seen.later).toBeUndefined();
    expect(seen.first).toMatchObject({ ok: true, result: { graspQuality: { contactCount: 3 } } });
    const derived = computeSheetInSteps({ type: 'compute', id: 14, document: moved('0.0175 deg') });
    expect(derived.later).toBeUndefined();
    expect(derived.first).toMatchObject({ ok: true, result: { graspQuality: { contactCount: 3 } } });
  });

  it('reports a document that does not read in its one reply', () => {
    const doc = sheet();
    doc.hand.fingers[1].roller.radius = '30 deg';
    const steps = computeSheetInSteps({ type: 'compute', id: 15, document: doc, derive: false }, () => 0);
    expect(steps.later).toBeUndefined();
    expect(steps.first).toEqual({ type: 'computed', id: 15, ok: false, elapsedMs: 0, issues: [{ path: 'hand.fingers[1].roller.radius', message: 'expected a length, got 30 deg' }] });
    expect(computeSheetInSteps(null).first).toMatchObject({ type: 'refused' });
  });
});
