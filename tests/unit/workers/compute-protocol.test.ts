import { readFileSync } from 'node:fs';
import { describe, expect, it, vi } from 'vitest';
import { MAX_DOCUMENT_DEPTH, readDocument } from '../../../src/lib/sheet/readings';
import { WARM_UP_ROUNDS, computeSheet, computeSheetInSteps, createComputeHandler, type ComputeReply } from '../../../src/workers/compute-protocol';

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
      readings: expect.any(Object),
    });
  });

  it('tells how each quantity text and variable reads, also when the sheet does not read', () => {
    const doc = sheet();
    doc.variables = 'rollerRadius = 14 mm\nbad = 2 +';
    doc.hand.fingers[0].roller.radius = 'rollerRadius + 2 mm';
    doc.hand.fingers[1].roller.radius = '30 deg';
    const reply = computeSheet({ type: 'compute', id: 8, document: doc });
    if (reply.type !== 'computed') throw new Error('expected a reply');
    const { fields, variables } = reply.readings;
    // 14 mm + 2 mm = 0.016 m (SI prefix milli = 1e-3, SI brochure 9th ed.); 30 deg = pi/6 rad (SI brochure Table 8).
    expect(fields['hand.fingers[0].roller.radius']).toEqual({ text: 'rollerRadius + 2 mm', kind: 'length', value: expect.closeTo(0.016, 15) });
    expect(fields['hand.fingers[1].roller.radius']).toEqual({ text: '30 deg', kind: 'angle', value: expect.closeTo(Math.PI / 6, 15) });
    // Free text is never read as a quantity.
    expect(Object.keys(fields).some((path) => path === 'title' || path === 'description')).toBe(false);
    expect(variables.text).toBe(doc.variables);
    expect(variables.values).toEqual([{ line: 1, value: '0.014 m' }]);
    expect(variables.issues).toEqual([expect.objectContaining({ line: 2 })]);
    expect(structuredClone(reply)).toEqual(reply);
  });

  it('reads each quantity text as the sheet reader does for its field (the SI value it solves with)', () => {
    const reply = computeSheet({ type: 'compute', id: 9, document: sheet(), derive: false });
    if (reply.type !== 'computed' || !reply.ok) throw new Error('expected results');
    const written = Object.entries(reply.readings.fields);
    const doc = reply.document as unknown as { object: { shape: { radius: number }; pose: { position: number[] } } };
    // Reference: the parsed document the core solves (the sheet reader's parseQuantity per field kind).
    expect(reply.readings.fields['object.shape.radius']).toEqual({ text: '26 mm', kind: 'length', value: doc.object.shape.radius });
    expect(reply.readings.fields['object.pose.position[2]']).toEqual({ text: '90 mm', kind: 'length', value: doc.object.pose.position[2] });
    // 30 deg/s = pi/6 rad/s (SI brochure Table 8).
    expect(reply.readings.fields['object.twist.angular[2]']).toEqual({ text: '30 deg/s', kind: 'angularSpeed', value: expect.closeTo(Math.PI / 6, 15) });
    for (const [, reading] of written) expect(Number.isFinite(reading.value)).toBe(true);
  });

  it('refuses a document nested deeper than a sheet nests where it passes the bound, without overflowing the stack', () => {
    let deep: unknown = '1 mm';
    for (let level = 0; level < 100_000; level++) deep = [deep];
    const doc = sheet();
    doc.hand.fingers[0].roller.radius = deep;
    doc.hand.fingers[1].roller.radius = '12 mm';
    const reply = computeSheet({ type: 'compute', id: 3, document: doc, derive: false }, () => 0);
    // The radius is 5 levels down (hand, fingers, 0, roller, radius); 59 lists further the next list is past the bound.
    const where = `hand.fingers[0].roller.radius${'[0]'.repeat(MAX_DOCUMENT_DEPTH - 5)}`;
    expect(reply).toMatchObject({ ok: false, issues: [{ path: where, message: expect.stringContaining(`${MAX_DOCUMENT_DEPTH} levels`) }] });
    expect(computeSheetInSteps({ type: 'compute', id: 4, document: doc, derive: false }).first).toMatchObject({ ok: false, issues: [{ path: where }] });
    // The other fields still read.
    if (reply.type !== 'computed') throw new Error('expected a reply');
    expect(reply.readings.fields['hand.fingers[1].roller.radius']).toMatchObject({ kind: 'length', value: 0.012 });
    // A sheet as deep as it may be is read as ever.
    let atBound: unknown = '1 mm';
    for (let level = 0; level < MAX_DOCUMENT_DEPTH - 5; level++) atBound = [atBound];
    doc.hand.fingers[0].roller.radius = atBound;
    expect(computeSheet({ type: 'compute', id: 5, document: doc, derive: false })).toMatchObject({ ok: false, issues: [{ path: 'hand.fingers[0].roller.radius' }] });
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
    expect(steps.first).toEqual({
      type: 'computed', id: 15, ok: false, elapsedMs: 0, readings: readDocument(doc),
      issues: [{ path: 'hand.fingers[1].roller.radius', message: 'expected a length, got 30 deg' }],
    });
    expect(computeSheetInSteps(null).first).toMatchObject({ type: 'refused' });
  });
});

describe('createComputeHandler (requests, and the warm-up while the page is idle)', () => {
  /** A handler whose deferred tasks wait in a queue the test runs. */
  function handler(create: typeof createComputeHandler = createComputeHandler) {
    const replies: ComputeReply[] = [];
    const queue: (() => void)[] = [];
    const handle = create((reply) => replies.push(reply), (next) => queue.push(next));
    return { replies, queue, handle, runQueue: () => { while (queue.length > 0) queue.shift()!(); } };
  }
  const edited = (radius: string) => {
    const doc = sheet();
    doc.hand.fingers[2].roller.radius = radius;
    return doc;
  };
  /** The reply the page ends with for each id (the second one when the grasp quality came later; a cached one comes at once). */
  const finalReplies = (replies: readonly ComputeReply[]) =>
    [...new Map(replies.map((reply) => [reply.type === 'computed' ? reply.id : -1, { ...reply, elapsedMs: 0 }])).values()];

  it('makes the warm-up rounds one deferred task each, answering nothing', () => {
    const { replies, queue, handle } = handler();
    handle({ type: 'warm-up', document: sheet() });
    let tasks = 0;
    while (queue.length > 0) {
      queue.shift()!();
      tasks++;
    }
    // One task per round, and the last round's task finds nothing left to do.
    expect(tasks).toBe(WARM_UP_ROUNDS + 1);
    expect(replies).toEqual([]);
  });

  it('answers requests made during a warm-up as a cold worker without one answers them, and makes no more rounds', async () => {
    const warm = handler();
    warm.handle({ type: 'warm-up', document: sheet() });
    for (let round = 0; round < 5; round++) warm.queue.shift()!();
    const requests = ['13.5 mm', '13 mm', '12.5 mm'].map((radius, k) => ({ type: 'compute', id: k + 1, document: edited(radius), derive: false }));
    for (const request of requests) {
      warm.handle(request);
      warm.runQueue();
    }
    expect(warm.queue).toEqual([]);
    // The reference: the worker's modules loaded afresh (every cache empty), no warm-up.
    vi.resetModules();
    const fresh = await import('../../../src/workers/compute-protocol');
    const cold = handler(fresh.createComputeHandler);
    for (const request of requests) {
      cold.handle(request);
      cold.runQueue();
    }
    expect(finalReplies(warm.replies).map((reply) => reply.type === 'computed' && reply.ok && reply.id)).toEqual([1, 2, 3]);
    expect(finalReplies(warm.replies)).toEqual(finalReplies(cold.replies));
  });

  it('drops a warm-up of a document that does not read, or is no document, without a word', () => {
    const { replies, handle, runQueue } = handler();
    const broken = sheet();
    broken.hand.fingers = 'none';
    let deep: unknown = '1 mm';
    for (let level = 0; level < 100_000; level++) deep = [deep];
    for (const document of [broken, null, 'a sheet', { hand: { fingers: [{ roller: { radius: deep } }] } }]) {
      handle({ type: 'warm-up', document });
      runQueue();
    }
    expect(replies).toEqual([]);
  });
});
