/**
 * The message protocol of the log-comparison worker: the page posts one request (the stored
 * document of a sheet revision, the mapping as the form wrote it, and the log file the user
 * picked), the worker streams the file through the same compareLog the server and the CLI run,
 * posting progress in file bytes read at most every PROGRESS_INTERVAL_MS, and answers with exactly
 * one comparison, failure (with every located issue) or cancellation. Nothing leaves the browser.
 * performLogCompare is the whole worker apart from the message plumbing, so it runs in tests.
 */
import { compareLog, describeComparisonError, type LogComparison } from '../lib/logs/compare';
import { openLogText, streamLogText } from '../lib/logs/log-file';
import { parseLogMapping } from '../lib/logs/mapping';
import { parseSheet } from '../lib/sheet/schema';

export interface LogCompareRequest {
  type: 'compare-log';
  /** The revision's document as stored (the worker reads it as the server does). */
  document: unknown;
  /** The mapping as written (units named, tolerances as text). */
  mapping: unknown;
  /** The log: CSV, or gzip-compressed CSV told by its magic bytes. */
  file: Blob;
}

/** Asks the worker to stop the comparison it is running. */
export interface LogCompareCancel {
  type: 'cancel';
}

/** How far the reading got: file bytes (compressed bytes for gzip), compared samples, time since the start. */
export interface LogCompareProgress {
  bytesRead: number;
  totalBytes: number;
  samples: number;
  elapsedMs: number;
}

export type LogCompareReply =
  | ({ kind: 'progress' } & LogCompareProgress)
  | ({ kind: 'done'; result: LogComparison; progressMessages: number } & LogCompareProgress)
  | { kind: 'failed'; message: string; issues: string[] }
  | ({ kind: 'cancelled' } & LogCompareProgress);

/** Shortest time between two progress messages, ms: ten a second keep a bar moving without flooding the page. */
export const PROGRESS_INTERVAL_MS = 100;

/** Samples compared between two readings of the clock for progress (a power of two). */
export const SAMPLES_PER_CLOCK_READING = 1024;

export interface PerformOptions {
  signal?: AbortSignal;
  now?: () => number;
}

function isRequest(message: unknown): message is LogCompareRequest {
  if (message === null || typeof message !== 'object') return false;
  const { type, file } = message as Record<string, unknown>;
  return type === 'compare-log' && file instanceof Blob;
}

/** Compares the log with the sheet, posting throttled progress and then one outcome; an abort of `signal` ends it with "cancelled". */
export async function performLogCompare(message: unknown, post: (reply: LogCompareReply) => void, options: PerformOptions = {}): Promise<void> {
  const now = options.now ?? (() => performance.now());
  if (!isRequest(message)) {
    post({ kind: 'failed', message: 'The worker received a message that is not a log comparison.', issues: [] });
    return;
  }
  const sheet = parseSheet(message.document);
  if (!sheet.ok) {
    post({ kind: 'failed', message: 'This revision of the sheet does not read as a sheet document.', issues: sheet.issues.map((issue) => `${issue.path}: ${issue.message}`) });
    return;
  }
  const mapping = parseLogMapping(message.mapping);
  if (!mapping.ok) {
    post({ kind: 'failed', message: 'The mapping is not complete.', issues: mapping.issues.map((issue) => `mapping: ${issue.path}: ${issue.message}`) });
    return;
  }
  const started = now();
  const totalBytes = message.file.size;
  let bytesRead = 0, samples = 0, progressMessages = 0, lastPost = started;
  const progress = (): LogCompareProgress => ({ bytesRead, totalBytes, samples, elapsedMs: now() - started });
  const maybePost = () => {
    const at = now();
    if (at - lastPost < PROGRESS_INTERVAL_MS) return;
    lastPost = at;
    progressMessages++;
    post({ kind: 'progress', ...progress() });
  };
  const onBytes = (read: number) => {
    bytesRead = read;
    maybePost();
  };
  // A slice of a gzip file can hold megabytes of text, so the samples move the progress on too.
  const onSample = () => {
    if ((++samples & (SAMPLES_PER_CLOCK_READING - 1)) === 0) maybePost();
  };
  const streamed = streamLogText(await openLogText(message.file, onBytes), options.signal);
  try {
    const compared = await compareLog(sheet.doc, mapping.mapping, streamed.source, { onSample });
    if (compared.ok) post({ kind: 'done', result: compared.value, progressMessages, ...progress() });
    else post({ kind: 'failed', message: compared.error.message, issues: describeComparisonError(compared.error) });
  } catch (error) {
    if (options.signal?.aborted) post({ kind: 'cancelled', ...progress() });
    else post({ kind: 'failed', message: `The log could not be read to its end (a damaged gzip file?): ${error instanceof Error ? error.message : String(error)}`, issues: [] });
  } finally {
    streamed.stop();
  }
}
