import { describe, expect, it } from 'vitest';
import { runSheet } from '../../../src/lib/kinematics';
import { runMatrix } from '../../../src/lib/sheet/matrix';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import { createMessageHandler, performJob, PROGRESS_INTERVAL_MS, WARM_UP_ROUNDS, type WorkerReply } from '../../../src/workers/run-protocol';

function sheet(maxTicks: number) {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  doc.motion.run = { ...doc.motion.run, maxTicks, positionTolerance: 1e-12, angleTolerance: 1e-12, stopOnSingular: false };
  return doc;
}

/** Runs a job and collects what the worker would post, on a clock that moves `step` ms each time it is read. */
function perform(job: unknown, step = 7) {
  const replies: { reply: WorkerReply; transfer: ArrayBuffer[] }[] = [];
  let clock = 100;
  performJob(job, (reply, transfer) => replies.push({ reply, transfer }), () => (clock += step));
  return replies;
}

describe('performJob', () => {
  it('runs a matrix job, reporting progress once per run and then the result of runMatrix for the same settings', () => {
    const doc = sheet(50);
    const settings = { targets: [{ orientation: { w: Math.cos(0.1), x: Math.sin(0.1), y: 0, z: 0 } }], starts: [], generators: [{ kind: 'random' as const, count: 2, seed: 4 }], metric: 'phi3' as const };
    // Each run reads the clock once for its progress: 3 runs of PROGRESS_INTERVAL_MS each report every one.
    const replies = perform({ kind: 'matrix', document: doc, settings }, PROGRESS_INTERVAL_MS);
    expect(replies.filter((r) => r.reply.kind === 'progress').map((r) => r.reply)).toEqual([1, 2, 3].map((done) => ({ kind: 'progress', done, total: 3 })));
    const last = replies.at(-1)!.reply;
    expect(last.kind).toBe('matrix-done');
    if (last.kind !== 'matrix-done') return;
    expect(last.result).toEqual(runMatrix(doc, settings));
    expect(last.elapsedMs).toBe(4 * PROGRESS_INTERVAL_MS);
  });

  it('runs the sheet to its tick limit, looking at the clock 200 times, reporting progress at most once per interval, and then one result', () => {
    const doc = sheet(1000);
    // The clock moves 7 ms a look: progress goes out at every fifth look (35 ms after the one before), 40 of the 200.
    const replies = perform({ kind: 'run', document: doc });
    const progress = replies.filter((r) => r.reply.kind === 'progress').map((r) => r.reply as { done: number; total: number });
    expect(progress).toHaveLength(40);
    expect(progress[0]).toEqual({ kind: 'progress', done: 25, total: 1000 });
    expect(progress.at(-1)).toEqual({ kind: 'progress', done: 1000, total: 1000 });
    const last = replies.at(-1)!;
    expect(last.reply.kind).toBe('run-done');
    if (last.reply.kind !== 'run-done') return;
    const series = last.reply.series;
    expect(series.tickCount).toBe(1000);
    expect(series.stopReason).toBe('tick-limit');
    expect(series.elapsedMs).toBe(201 * 7);
    const record = runSheet(doc);
    expect(Array.from(series.positionError)).toEqual(Array.from(record.positionError));
    expect(last.transfer).toContain(series.positionError.buffer);
    expect(last.transfer).toContain(series.jointRates[3]!.values.buffer);
  });

  it('uses the settings given with the job instead of the sheet’s', () => {
    const doc = sheet(1000);
    const replies = perform({ kind: 'run', document: doc, settings: { ...doc.motion.run, maxTicks: 30 } });
    const last = replies.at(-1)!.reply;
    expect(last.kind === 'run-done' && last.series.tickCount).toBe(30);
  });

  it('sweeps with progress after every value that took an interval, and none for values done sooner', () => {
    const settings = { path: '/hand/fingers/0/roller/radius', from: 0.011, to: 0.013, steps: 5 };
    const slow = perform({ kind: 'sweep', document: sheet(10), settings }, PROGRESS_INTERVAL_MS);
    expect(slow.filter((r) => r.reply.kind === 'progress').map((r) => (r.reply as { done: number }).done)).toEqual([1, 2, 3, 4, 5]);
    const replies = perform({ kind: 'sweep', document: sheet(10), settings }, 1);
    expect(replies.filter((r) => r.reply.kind === 'progress')).toEqual([]);
    const last = replies.at(-1)!.reply;
    expect(last.kind).toBe('sweep-done');
    if (last.kind !== 'sweep-done') return;
    expect(last.series.values).toBeNear([0.011, 0.0115, 0.012, 0.0125, 0.013], { digits: 15 });
    expect(last.series.fingers[0]!.gap[0]! - last.series.fingers[0]!.gap[4]!).toBeCloseTo(0.002, 12);
  });

  it('reports a failure in words for a bad sweep path or a message that is not a job', () => {
    const bad = perform({ kind: 'sweep', document: sheet(10), settings: { path: '/object/nowhere', from: 0, to: 1, steps: 2 } });
    expect(bad).toEqual([{ reply: { kind: 'failed', message: expect.stringMatching(/does not exist/) }, transfer: [] }]);
    for (const junk of [null, 'run', { kind: 'run' }, { kind: 'sweep', document: {} }, { kind: 'explode', document: {} }]) {
      expect(perform(junk)).toEqual([{ reply: { kind: 'failed', message: expect.stringMatching(/not a run, sweep or matrix job/) }, transfer: [] }]);
    }
  });
});

describe('createMessageHandler', () => {
  /** A handler whose deferred tasks wait in a queue the test runs. */
  function handler() {
    const replies: WorkerReply[] = [];
    const queue: (() => void)[] = [];
    const handle = createMessageHandler((reply) => replies.push(reply), (next) => queue.push(next));
    return { replies, queue, handle };
  }

  it('makes the warm-up rounds one deferred task each, answering nothing', () => {
    const doc = sheet(1000);
    const { replies, queue, handle } = handler();
    handle({ kind: 'warm-up', document: doc, settings: { ...doc.motion.run, maxTicks: 20 } });
    let tasks = 0;
    while (queue.length > 0) {
      queue.shift()!();
      tasks++;
    }
    // One task per round, and the last round's task finds nothing left to do.
    expect(tasks).toBe(WARM_UP_ROUNDS + 1);
    expect(replies).toEqual([]);
  });

  it('answers a job posted during a warm-up at once, as runSheet computes it, and makes no more warm-up rounds', () => {
    const doc = sheet(300);
    const { replies, queue, handle } = handler();
    handle({ kind: 'warm-up', document: doc, settings: { ...doc.motion.run, maxTicks: 20 } });
    queue.shift()!();
    handle({ kind: 'run', document: doc });
    const last = replies.at(-1)!;
    expect(last.kind).toBe('run-done');
    if (last.kind !== 'run-done') return;
    // The warm-up's runs leave nothing behind that a later run reads: the fresh core's own run is the reference.
    expect(Array.from(last.series.positionError)).toEqual(Array.from(runSheet(doc).positionError));
    expect(last.series.tickCount).toBe(300);
    queue.shift()!();
    expect(queue).toEqual([]);
  });

  it('drops a warm-up whose sheet cannot run without a word, and still answers the job after it with the failure', () => {
    const doc = sheet(10);
    const broken = { ...doc, hand: { ...doc.hand, fingers: 'none' } };
    const { replies, queue, handle } = handler();
    handle({ kind: 'warm-up', document: broken, settings: doc.motion.run });
    queue.shift()!();
    expect(queue).toEqual([]);
    expect(replies).toEqual([]);
    handle({ kind: 'run', document: broken });
    expect(replies).toEqual([{ kind: 'failed', message: expect.any(String) }]);
  });
});
