/**
 * A long log is compared in bounded memory: the heap after 300,000 samples is within a few
 * megabytes of the heap after the first 50,000, on one thread and on two. The log is streamed:
 * a 600-tick run of the sheet repeated with the time running on, so the log never exists whole.
 */
import { Readable } from 'node:stream';
import { runInNewContext } from 'node:vm';
import { setFlagsFromString } from 'node:v8';
import { describe, expect, it } from 'vitest';
import { runLogRow } from '../../../src/lib/logs/generate';
import { compareLog } from '../../../src/lib/logs/compare';
import { readLogThreaded } from '../../../src/lib/logs/threaded-read-log';
import { generatedRun } from './generated-log';

const SAMPLES = 300_000;
const ROWS_PER_CHUNK = 1000;
/**
 * Heap growth allowed from the 50,000th sample to the last, bytes: the comparison keeps no per-sample state, so
 * anything kept per sample (8 bytes or more over the 250,000 samples between the readings) fails.
 */
const ALLOWED_GROWTH = 2 * 1024 * 1024;

// A full collection before each reading, so garbage not yet collected does not count as growth.
setFlagsFromString('--expose-gc');
const collect = runInNewContext('gc') as () => void;

const run = generatedRun(600);
const { doc, mapping, record } = run;
const period = record.tickCount * doc.motion.run.dt;

function longLog(): Readable {
  return Readable.from((function* () {
    yield `${run.header.join(',')}\n`;
    for (let from = 0; from < SAMPLES; from += ROWS_PER_CHUNK) {
      const lines: string[] = [];
      for (let k = from; k < from + ROWS_PER_CHUNK; k++) {
        const row = runLogRow(record, k % record.tickCount);
        row[0] = Math.floor(k / record.tickCount) * period + row[0]!;
        lines.push(row.join(','));
      }
      yield `${lines.join('\n')}\n`;
    }
  })());
}

describe('a long log', () => {
  it.each([
    ['one thread', {}],
    ['two threads', { read: readLogThreaded }],
  ])('is compared in bounded memory on %s', async (_, reader) => {
    const heap: number[] = [];
    let count = 0;
    const result = await compareLog(doc, mapping, longLog(), {
      ...reader,
      onSample: () => {
        count++;
        if (count === 50_000 || count === SAMPLES - 1) {
          collect();
          heap.push(process.memoryUsage().heapUsed);
        }
      },
    });
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.value.samples).toBe(SAMPLES);
    expect(heap).toHaveLength(2);
    expect(heap[1]! - heap[0]!).toBeLessThan(ALLOWED_GROWTH);
  }, 120_000);
});
