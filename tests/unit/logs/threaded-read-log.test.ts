/**
 * Reading on two threads (Node) gives what reading on one gives: the same comparison, number for
 * number, the same samples and gaps, and the same located issues, whatever the source and however
 * its chunks cut lines and characters.
 */
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { compareLog } from '../../../src/lib/logs/compare';
import { readLog, type LogSample, type ReadLogOutcome } from '../../../src/lib/logs/read-log';
import { readLogThreaded, THREAD_CHUNK, THREAD_WINDOW } from '../../../src/lib/logs/threaded-read-log';
import { generatedRun, logText } from './generated-log';

// Long enough for many more chunks than the window, so the threads wait on each other.
const run = generatedRun(9000);
const { doc, mapping, header } = run;
const cutInsideOmega = (content: string) => Buffer.from(content).indexOf('Ω') + 1;
const text = logText(run, (row, tick) => {
  // A gap and a commanded-rate fault, so gaps, intervals and the verdict's reasons are compared too.
  if (tick >= 3000) row[0]! += 0.05;
  if (tick >= 1000 && tick < 1100) row[header.indexOf('north-pivot.commanded')]! += 0.3;
});

/** Bytes of `content` in chunks of `size`, cutting lines (and any multi-byte character) anywhere. */
function chunked(content: string, size: number): Readable {
  const bytes = Buffer.from(content, 'utf8');
  const chunks: Buffer[] = [];
  for (let at = 0; at < bytes.length; at += size) chunks.push(bytes.subarray(at, at + size));
  return Readable.from(chunks);
}

async function samplesOf(read: typeof readLog, source: string | Readable): Promise<{ outcome: ReadLogOutcome; samples: number[][]; gaps: number[][] }> {
  const samples: number[][] = [];
  const gaps: number[][] = [];
  const outcome = await read(source, mapping, {
    onSample: (s: LogSample) => samples.push([s.line, s.time, ...s.position, ...s.orientation, ...s.angles, ...s.commandedRates, ...s.measuredRates, Number(s.afterGap)]),
    onGap: (gap) => gaps.push([gap.line, gap.from, gap.to]),
  });
  return { outcome, samples, gaps };
}

describe('reading a log on two threads', () => {
  it('is long enough to wait on the window of chunks in flight', () => {
    expect(text.length).toBeGreaterThan((THREAD_WINDOW + 2) * THREAD_CHUNK);
  });

  it('compares a string log exactly as on one thread', async () => {
    const [single, threaded] = await Promise.all([compareLog(doc, mapping, text), compareLog(doc, mapping, text, { read: readLogThreaded })]);
    expect(single.ok).toBe(true);
    expect(threaded).toEqual(single);
    if (single.ok) {
      expect(single.value.gapCount).toBe(1);
      expect(single.value.verdict.withinTolerance).toBe(false);
    }
  });

  it('reads a byte stream cut at odd places into the same samples and gaps', async () => {
    const single = await samplesOf(readLog, text);
    const threaded = await samplesOf(readLogThreaded, chunked(text, 7919));
    expect(threaded.outcome).toEqual(single.outcome);
    expect(threaded.samples).toEqual(single.samples);
    expect(threaded.gaps).toEqual(single.gaps);
    expect(single.samples).toHaveLength(run.record.tickCount);
  });

  it('reads a text stream and non-ASCII header names cut inside a character', async () => {
    const renamed = text.replace('north-pivot.measured', 'north-pivot.measured·Ω');
    const raw = JSON.parse(JSON.stringify(mapping));
    raw.joints.find((j: { joint: string }) => j.joint === 'north-pivot').measuredRate.column = 'north-pivot.measured·Ω';
    expect(cutInsideOmega(renamed)).toBeGreaterThan(1);
    const stream = Readable.from([renamed.slice(0, 1000), renamed.slice(1000)]);
    const single = await compareLog(doc, raw, renamed);
    const threaded = await compareLog(doc, raw, chunked(renamed, cutInsideOmega(renamed)), { read: readLogThreaded });
    const fromText = await compareLog(doc, raw, stream, { read: readLogThreaded });
    expect(single.ok).toBe(true);
    expect(threaded).toEqual(single);
    expect(fromText).toEqual(single);
  });

  it.each([
    ['a bad header', (t: string) => t.replace('px,', 'qx,')],
    ['a cell that is not a number', (t: string) => t.replace(/\n(0\.01,[^,]*),/, '\n$1,n/a,')],
    ['more bad rows than are reported', (t: string) => t.split('\n').map((line, i) => (i > 100 && i < 200 ? `${line},extra` : line)).join('\n')],
    ['rows out of time order', (t: string) => { const lines = t.split('\n'); [lines[50], lines[51]] = [lines[51]!, lines[50]!]; return lines.join('\n'); }],
    ['a value beyond its limit', (t: string) => t.replace(/\n(0\.02,)[^,]*,/, '\n$120,')],
    ['only a header', (t: string) => `${t.split('\n')[0]}\n`],
    ['an empty log', () => ''],
    ['a blank first line', (t: string) => `\n${t}`],
  ])('locates the issues of %s as on one thread', async (_, change) => {
    const bad = change(text);
    const single = await compareLog(doc, mapping, bad);
    const threaded = await compareLog(doc, mapping, chunked(bad, 4099), { read: readLogThreaded });
    expect(single.ok).toBe(false);
    expect(threaded).toEqual(single);
  });
});
