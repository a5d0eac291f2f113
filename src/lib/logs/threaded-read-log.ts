/**
 * Reading a log on two threads in Node, for a caller that passes it to compareLog: a worker thread parses the CSV
 * with papaparse and extracts the mapped numbers (extractRecords, the same function the in-thread
 * reader runs), and hands batches of records over as transferred typed arrays; this thread runs
 * the record checks (createRecordReader) and whatever the caller does with each sample, so parsing
 * and re-solving overlap on two cores. The samples, gaps and issues are those of readLog: the same
 * code judges the same numbers in the same order. On an idle two-core machine this overlaps the two halves of the
 * work; where other work already takes the cores, the second thread only adds hand-offs, so the server and the
 * command line read on one thread (readLog) and `npm run bench` times both.
 *
 * The worker's code is evaluated from text (it needs no file of its own, whatever bundles this
 * module) and loads papaparse from this package's dependencies.
 */
import { EventEmitter } from 'node:events';
import { createRequire } from 'node:module';
import { Worker } from 'node:worker_threads';
import type { LogMapping } from './mapping';
import {
  createRecordReader, extractRecords, readLog, readRecords, type LogColumns, type LogSource, type ReadLogOptions, type ReadLogOutcome,
} from './read-log';

/**
 * Characters (or bytes) per chunk sent to the parsing thread: a stream's chunks are joined up to this size and a
 * string is cut to it. Each message between threads costs a wake-up of the other, so chunks are large.
 */
export const THREAD_CHUNK = 512 * 1024;
/** Chunks sent ahead of the records compared: keeps both threads busy while memory stays bounded. */
export const THREAD_WINDOW = 4;

type ToWorker =
  | { type: 'start' }
  | { type: 'text'; text: string; spare: Float64Array[] }
  | { type: 'bytes'; bytes: Uint8Array; spare: Float64Array[] }
  | { type: 'end' }
  | { type: 'columns'; columns: LogColumns };
type FromWorker =
  | { type: 'header'; row: string[] }
  | { type: 'records'; records: Float64Array; count: number; flagged: number[]; raws: string[][] }
  | { type: 'taken' }
  | { type: 'done' }
  | { type: 'error'; message: string };

/**
 * The parsing thread, one log at a time: 'start', then chunks of text or of UTF-8 bytes in (acknowledged once
 * parsed), the header out, then batches of extracted records, whose buffers come back to be
 * filled again so that neither thread keeps allocating.
 */
const WORKER_SOURCE = `
const { parentPort, workerData } = require('node:worker_threads');
const { EventEmitter } = require('node:events');
const Papa = require(workerData.papaparse);
const extractRecords = (${extractRecords.toString()});
const spare = [];
let log = null;
const start = () => {
  // papaparse reads any object that looks like a Node readable stream; byte messages become its data events.
  const input = new EventEmitter();
  input.readable = true;
  input.read = () => null;
  input.pause = () => {};
  input.resume = () => {};
  const state = { input, decoder: new TextDecoder('utf-8'), columns: null, headerSent: false, completed: false, line: 0, pending: [], flagged: [] };
  const send = (rows) => {
    const stride = state.columns.indices.length + 1;
    const size = Math.max(1, rows.length * stride);
    const found = spare.findIndex((buffer) => buffer.length >= size);
    const records = found >= 0 ? spare.splice(found, 1)[0] : new Float64Array(size);
    const flagged = state.flagged;
    flagged.length = 0;
    const first = state.line;
    const extracted = extractRecords(rows, first, state.columns, records, flagged);
    state.line = extracted.line;
    const raws = flagged.map((record) => rows[records[record * stride] - first - 1]);
    parentPort.postMessage({ type: 'records', records, count: extracted.count, flagged: flagged.slice(), raws }, [records.buffer]);
  };
  state.send = send;
  state.finishIfDone = () => {
    if (state.completed && (state.columns !== null || !state.headerSent)) parentPort.postMessage({ type: 'done' });
  };
  Papa.parse(input, {
    header: false,
    dynamicTyping: false,
    skipEmptyLines: false,
    chunk: (results) => {
      if (log !== state) return;
      let rows = results.data;
      if (!state.headerSent && rows.length > 0) {
        state.headerSent = true;
        state.line = 1;
        parentPort.postMessage({ type: 'header', row: rows[0] });
        rows = rows.slice(1);
      }
      if (state.columns === null) state.pending.push(rows);
      else send(rows);
    },
    complete: () => {
      state.completed = true;
      if (log === state) state.finishIfDone();
    },
    error: (error) => parentPort.postMessage({ type: 'error', message: String((error && error.message) || error) }),
  });
  return state;
};
parentPort.on('message', (message) => {
  if (message.type === 'start') {
    log = start();
  } else if (message.type === 'text' || message.type === 'bytes') {
    for (const records of message.spare) if (spare.length < 16) spare.push(records);
    const text = message.type === 'text' ? message.text : log.decoder.decode(message.bytes, { stream: true });
    if (text.length > 0) log.input.emit('data', text);
    parentPort.postMessage({ type: 'taken' });
  } else if (message.type === 'end') {
    const rest = log.decoder.decode();
    if (rest.length > 0) log.input.emit('data', rest);
    log.input.emit('end');
  } else if (message.type === 'columns') {
    log.columns = message.columns;
    for (const rows of log.pending) log.send(rows);
    log.pending = [];
    log.finishIfDone();
  }
});
`;

/** Idle parsing threads kept for the next log (starting one costs more CPU time than parsing a small log); they do not keep the process alive. */
const idle: Worker[] = [];
const MAX_IDLE = 2;

function takeWorker(): Worker {
  const kept = idle.pop();
  if (kept) {
    kept.ref();
    return kept;
  }
  const worker = new Worker(WORKER_SOURCE, { eval: true, workerData: { papaparse: papaparsePath() } });
  worker.once('exit', () => {
    const at = idle.indexOf(worker);
    if (at >= 0) idle.splice(at, 1);
  });
  return worker;
}

/** Keeps a thread that finished its log cleanly for the next one; ends one that stopped halfway. */
function releaseWorker(worker: Worker, clean: boolean): void {
  worker.removeAllListeners('message');
  worker.removeAllListeners('error');
  if (clean && idle.length < MAX_IDLE) {
    worker.unref();
    idle.push(worker);
  } else {
    void worker.terminate();
  }
}

const papaparsePath = (): string => createRequire(import.meta.url).resolve('papaparse');

function isNodeReadable(source: LogSource): source is NodeJS.ReadableStream {
  return typeof source === 'object' && source !== null && typeof (source as NodeJS.ReadableStream).on === 'function' && typeof (source as NodeJS.ReadableStream).read === 'function';
}

/**
 * The log in chunks of about THREAD_CHUNK to send: text as text (posting a string copies it, which costs less than
 * encoding it to transfer), bytes as bytes.
 */
async function* chunksOf(source: string | NodeJS.ReadableStream): AsyncGenerator<string | Uint8Array> {
  if (typeof source === 'string') {
    for (let at = 0; at < source.length; at += THREAD_CHUNK) yield source.slice(at, at + THREAD_CHUNK);
    return;
  }
  let texts: string[] = [], bytes: Uint8Array[] = [], size = 0;
  const joined = (): string | Uint8Array => {
    // Bytes are copied into a buffer of their own: a stream's buffers may share memory that must not be transferred.
    let chunk: string | Uint8Array;
    if (texts.length > 0) chunk = texts.join('');
    else {
      chunk = new Uint8Array(size);
      let at = 0;
      for (const part of bytes) {
        chunk.set(part, at);
        at += part.length;
      }
    }
    texts = [];
    bytes = [];
    size = 0;
    return chunk;
  };
  for await (const chunk of source as AsyncIterable<string | Uint8Array>) {
    if (typeof chunk === 'string' ? bytes.length > 0 : texts.length > 0) yield joined();
    if (typeof chunk === 'string') texts.push(chunk);
    else bytes.push(chunk);
    size += chunk.length;
    if (size >= THREAD_CHUNK) yield joined();
  }
  if (size > 0) yield joined();
}

/**
 * readLog on two threads for a string or a Node readable stream (anything else, or a machine where no worker
 * thread starts, is read on this thread by readLog); the same outcome, samples and gaps as readLog.
 */
export async function readLogThreaded(source: LogSource, mapping: LogMapping, options: ReadLogOptions): Promise<ReadLogOutcome> {
  if (typeof source !== 'string' && !isNodeReadable(source)) return readLog(source, mapping, options);
  let worker: Worker;
  try {
    worker = takeWorker();
  } catch {
    return readLog(source, mapping, options);
  }
  const reader = createRecordReader(mapping, options);
  const events = new EventEmitter();
  let outstanding = 0;
  let settled = false;
  let columns: LogColumns | null = null;
  const spare: Float64Array[] = [];

  const outcome = new Promise<ReadLogOutcome>((resolve, reject) => {
    const onExit = (): void => settle(new Error('the log-reading thread stopped before the end of the log'));
    /** Ends this read; `clean` when the thread has parsed the whole log and may take the next one. */
    const settle = (result: ReadLogOutcome | Error, clean = false): void => {
      if (settled) return;
      settled = true;
      worker.off('exit', onExit);
      releaseWorker(worker, clean);
      events.emit('wake');
      if (result instanceof Error) reject(result);
      else resolve(result);
    };
    const post = (message: ToWorker): void => worker.postMessage(message);
    worker.on('message', (message: FromWorker) => {
      if (settled) return;
      try {
        switch (message.type) {
          case 'header':
            columns = reader.header(message.row);
            if (columns === null) settle(reader.finish());
            else post({ type: 'columns', columns });
            break;
          case 'records': {
            if (columns === null) break;
            const stride = columns.indices.length + 1;
            readRecords(reader, message.records, stride, message.count, message.flagged, (_, k) => message.raws[k]!);
            if (reader.stopped) settle(reader.finish());
            else spare.push(message.records);
            break;
          }
          case 'taken':
            outstanding--;
            events.emit('wake');
            break;
          case 'done':
            settle(reader.finish(), true);
            break;
          case 'error':
            settle(new Error(message.message));
            break;
        }
      } catch (error) {
        settle(error instanceof Error ? error : new Error(String(error)));
      }
    });
    worker.on('error', (error) => settle(error));
    worker.on('exit', onExit);
    post({ type: 'start' });

    const feed = async (): Promise<void> => {
      for await (const chunk of chunksOf(source)) {
        while (outstanding >= THREAD_WINDOW && !settled) await new Promise((wake) => events.once('wake', wake));
        if (settled) return;
        outstanding++;
        // Record buffers already read go back with the next chunk rather than in messages of their own.
        const returned = spare.splice(0);
        const transfer = returned.map((records) => records.buffer as ArrayBuffer);
        if (typeof chunk === 'string') worker.postMessage({ type: 'text', text: chunk, spare: returned } satisfies ToWorker, transfer);
        else worker.postMessage({ type: 'bytes', bytes: chunk, spare: returned } satisfies ToWorker, [chunk.buffer as ArrayBuffer, ...transfer]);
      }
      if (!settled) post({ type: 'end' });
    };
    feed().catch((error: unknown) => settle(error instanceof Error ? error : new Error(String(error))));
  });
  return outcome;
}
