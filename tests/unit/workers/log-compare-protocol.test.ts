import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { compareLog } from '../../../src/lib/logs/compare';
import { runLogMapping } from '../../../src/lib/logs/generate';
import { FILE_CHUNK_BYTES, readLogHeader } from '../../../src/lib/logs/log-file';
import { performLogCompare, PROGRESS_INTERVAL_MS, SAMPLES_PER_CLOCK_READING, type LogCompareReply } from '../../../src/workers/log-compare-protocol';
import { generatedRun, logText, TOLERANCES } from '../logs/generated-log';

// A log long enough to arrive in many chunks (about 2.5 MB of text).
const run = generatedRun(4000);
const text = logText(run);
const mapping = runLogMapping(run.doc, TOLERANCES);

/** Runs one request as the worker would, with a clock that advances `step` ms at every reading; collects the replies. */
async function perform(file: Blob, options: { step?: number; abortAfterProgress?: number; document?: unknown; mapping?: unknown } = {}) {
  const replies: LogCompareReply[] = [];
  const controller = new AbortController();
  let clock = 0;
  await performLogCompare(
    { type: 'compare-log', document: options.document ?? run.doc, mapping: options.mapping ?? mapping, file },
    (reply) => {
      replies.push(reply);
      if (reply.kind === 'progress' && replies.length === options.abortAfterProgress) controller.abort();
    },
    { signal: controller.signal, now: () => (clock += options.step ?? 1) },
  );
  return replies;
}

const progressOf = (replies: LogCompareReply[]) => replies.filter((r): r is Extract<LogCompareReply, { kind: 'progress' }> => r.kind === 'progress');

describe('performLogCompare', () => {
  it('answers with the same comparison as compareLog on the text in Node', async () => {
    const replies = await perform(new Blob([text]));
    const last = replies.at(-1)!;
    expect(last.kind).toBe('done');
    if (last.kind !== 'done') return;
    const direct = await compareLog(run.doc, run.mapping, text);
    expect(direct.ok).toBe(true);
    if (!direct.ok) return;
    expect(last.result).toEqual(direct.value);
    // A log written from the sheet's own run passes (the comparison's tests show why).
    expect(last.result.verdict.withinTolerance).toBe(true);
    expect(last.samples).toBe(run.record.tickCount);
    expect(last.bytesRead).toBe(new Blob([text]).size);
  });

  it('posts progress that only grows, at most one message per PROGRESS_INTERVAL_MS of its clock', async () => {
    const step = 45;
    const replies = await perform(new Blob([text]), { step });
    const progress = progressOf(replies);
    const done = replies.at(-1)!;
    expect(done.kind).toBe('done');
    if (done.kind !== 'done') return;
    expect(progress.length).toBeGreaterThan(3);
    expect(done.progressMessages).toBe(progress.length);
    for (let k = 1; k < progress.length; k++) {
      expect(progress[k]!.bytesRead).toBeGreaterThanOrEqual(progress[k - 1]!.bytesRead);
      expect(progress[k]!.samples).toBeGreaterThanOrEqual(progress[k - 1]!.samples);
      expect(progress[k]!.elapsedMs - progress[k - 1]!.elapsedMs).toBeGreaterThanOrEqual(PROGRESS_INTERVAL_MS);
    }
    expect(progress.at(-1)!.bytesRead).toBeLessThanOrEqual(done.totalBytes);
    expect(progress.every((p) => p.totalBytes === done.totalBytes)).toBe(true);
  });

  it('posts no progress at all when the whole log takes less than the interval', async () => {
    const replies = await perform(new Blob([text]), { step: 0 });
    expect(replies.map((r) => r.kind)).toEqual(['done']);
  });

  it('stops early when cancelled and says so, with how far it got', async () => {
    const replies = await perform(new Blob([text]), { step: PROGRESS_INTERVAL_MS, abortAfterProgress: 1 });
    const last = replies.at(-1)!;
    expect(last.kind).toBe('cancelled');
    if (last.kind !== 'cancelled') return;
    expect(last.samples).toBeLessThan(run.record.tickCount / 2);
    expect(last.bytesRead).toBeLessThan(last.totalBytes);
    expect(replies.filter((r) => r.kind !== 'progress')).toHaveLength(1);
  });

  it('reads a gzip file (told by its magic bytes, whatever its name) to the same comparison', async () => {
    const gzipped = new File([new Uint8Array(gzipSync(text))], 'controller.csv', { type: 'text/csv' });
    const [plain, compressed] = [await perform(new Blob([text])), await perform(gzipped)];
    const a = plain.at(-1)!, b = compressed.at(-1)!;
    expect(b.kind).toBe('done');
    if (a.kind !== 'done' || b.kind !== 'done') return;
    expect(b.result).toEqual(a.result);
    // Progress counts the file's own (compressed) bytes.
    expect(b.bytesRead).toBe(gzipped.size);
    expect(await readLogHeader(gzipped)).toEqual(run.header);
  });

  it('moves the progress on with the samples where one slice of a gzip file holds much text', async () => {
    const gzipped = new Blob([new Uint8Array(gzipSync(text))]);
    const slices = Math.ceil(gzipped.size / FILE_CHUNK_BYTES);
    const progress = progressOf(await perform(gzipped, { step: PROGRESS_INTERVAL_MS }));
    expect(progress.length).toBeGreaterThan(slices);
    expect(progress.filter((p) => p.samples > 0).length).toBeGreaterThanOrEqual(run.record.tickCount / SAMPLES_PER_CLOCK_READING - 1);
  });

  it('fails a damaged gzip file in words, never with a thrown error', async () => {
    const whole = new Uint8Array(gzipSync(text));
    const replies = await perform(new Blob([whole.subarray(0, whole.length >> 1)]));
    expect(replies.at(-1)).toEqual({ kind: 'failed', message: expect.stringMatching(/could not be read to its end/), issues: [] });
  });

  it('locates a bad cell by line, column and name', async () => {
    const px = run.header.indexOf('px');
    // Line 1 is the header, so tick 9 is line 11.
    const bad = logText(run, (row, tick) => {
      if (tick === 9) row[px] = Number.NaN;
    });
    const replies = await perform(new Blob([bad]));
    const last = replies.at(-1)!;
    expect(last.kind).toBe('failed');
    if (last.kind !== 'failed') return;
    expect(last.issues[0]).toBe(`line 11, column ${px + 1} ("px"): expected a position (a decimal number), found "NaN"`);
  });

  it('names the mapping field and the sheet document problems instead of comparing', async () => {
    const noTime = { ...mapping, time: { unit: 's' } };
    const mappingReply = (await perform(new Blob([text]), { mapping: noTime })).at(-1)!;
    expect(mappingReply).toEqual({ kind: 'failed', message: 'The mapping is not complete.', issues: ['mapping: time.column: expected a column name (text)'] });
    const sheetReply = (await perform(new Blob([text]), { document: { hand: 1 } })).at(-1)!;
    expect(sheetReply.kind === 'failed' && sheetReply.message).toMatch(/does not read as a sheet document/);
  });

  it('refuses a message that is not a request', async () => {
    const replies: LogCompareReply[] = [];
    await performLogCompare({ type: 'compare-log', document: run.doc, mapping }, (reply) => replies.push(reply));
    expect(replies).toEqual([{ kind: 'failed', message: 'The worker received a message that is not a log comparison.', issues: [] }]);
  });
});

describe('readLogHeader', () => {
  it('reads the column names of the first line of a plain file, and none of an empty one', async () => {
    expect(await readLogHeader(new Blob([text]))).toEqual(run.header);
    expect(await readLogHeader(new Blob(['t ,"px",py\r\n1,2,3\r\n']))).toEqual(['t', 'px', 'py']);
    expect(await readLogHeader(new Blob([]))).toEqual([]);
  });
});
