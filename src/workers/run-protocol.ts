/**
 * The message protocol of the run worker: the page posts one job (a run toward the sheet's target
 * or a sweep of one input), the worker answers with progress messages and then exactly one result
 * or failure. A page that creates the worker ahead of its first run may post a warm-up first, which
 * gets no reply. createMessageHandler is the whole worker apart from the message plumbing, so it
 * runs in tests.
 */
import { runSheet, sweepSheet } from '../lib/kinematics';
import { runMatrix, type MatrixResult } from '../lib/sheet/matrix';
import type { MatrixSettings, RunSettings, SheetDocument, SweepSettings } from '../lib/sheet/types';
import { runSeries, sweepSeries, transferablesOf, type RunSeries, type SweepSeries } from '../lib/view/series';
import { nextTask, warmUpInTasks } from './warm-up';

export type WorkerJob =
  | { kind: 'run'; document: SheetDocument; settings?: RunSettings }
  | { kind: 'sweep'; document: SheetDocument; settings: SweepSettings }
  | { kind: 'matrix'; document: SheetDocument; settings: MatrixSettings };

export type WorkerReply =
  | { kind: 'progress'; done: number; total: number }
  | { kind: 'run-done'; series: RunSeries }
  | { kind: 'sweep-done'; series: SweepSeries }
  | { kind: 'matrix-done'; result: MatrixResult; elapsedMs: number }
  | { kind: 'failed'; message: string };

export type PostReply = (reply: WorkerReply, transfer: ArrayBuffer[]) => void;

/**
 * Short runs of the sheet, their results dropped, so that its first real run finds the run's code compiled: cold, V8
 * spends its first two runs in a worker interpreting and recompiling (a 2,000-tick run took 600 ms, then 270 ms, then
 * 60 ms in Chromium at load 13). The page gives the settings (the sheet's, with fewer ticks), so that they arrive with the same
 * hidden class as a job's.
 */
export interface WarmUp {
  kind: 'warm-up';
  document: SheetDocument;
  settings: RunSettings;
}

/** How many short runs a warm-up makes, one per task, so that a job posted meanwhile waits for one at most. */
export const WARM_UP_ROUNDS = 4;

/** The run looks at the clock about this many times, whatever its length. */
const PROGRESS_CHECKS = 200;
/**
 * Progress goes out at most once in this many milliseconds: each message costs the worker and the page a task, and the
 * page shows at most one a frame, so a short run posts none and a long one a few a frame's worth apart.
 */
export const PROGRESS_INTERVAL_MS = 30;

function isWarmUp(value: unknown): value is WarmUp {
  if (value === null || typeof value !== 'object') return false;
  const message = value as Record<string, unknown>;
  return message.kind === 'warm-up' && message.document !== null && typeof message.document === 'object' && message.settings !== null && typeof message.settings === 'object';
}

function isJob(value: unknown): value is WorkerJob {
  if (value === null || typeof value !== 'object') return false;
  const job = value as Record<string, unknown>;
  const hasDocument = job.document !== null && typeof job.document === 'object';
  if (job.kind === 'run') return hasDocument;
  return (job.kind === 'sweep' || job.kind === 'matrix') && hasDocument && job.settings !== null && typeof job.settings === 'object';
}

/** A run and its plot columns, the way a run job makes them (its elapsed time read once the ticks are done). */
function runToSeries(document: SheetDocument, settings: RunSettings, onProgress: (done: number, total: number) => void, elapsed: () => number): RunSeries {
  const progressEvery = Math.max(1, Math.ceil(settings.maxTicks / PROGRESS_CHECKS));
  const record = runSheet(document, { settings, onProgress, progressEvery });
  return runSeries(document, record, elapsed());
}

/**
 * The worker's answer to each message: a job is carried out at once; a warm-up makes its rounds one per deferred task
 * and stops making them once a job has arrived (that job's own run compiles the rest).
 */
export function createMessageHandler(post: PostReply, defer: (next: () => void) => void = nextTask): (message: unknown) => void {
  // Counts messages: a warm-up goes on only while no message came after it.
  let messages = 0;
  return (message) => {
    const asked = ++messages;
    if (!isWarmUp(message)) {
      performJob(message, post);
      return;
    }
    warmUpInTasks(WARM_UP_ROUNDS, () => runToSeries(message.document, message.settings, () => {}, () => 0), () => asked === messages, defer);
  };
}

/** Carries out one job, posting progress and then the result (its typed arrays transferred) or the failure. */
export function performJob(job: unknown, post: PostReply, now: () => number = () => performance.now()): void {
  if (!isJob(job)) {
    post({ kind: 'failed', message: 'The worker received a message that is not a run, sweep or matrix job.' }, []);
    return;
  }
  const started = now();
  let lastProgress = started;
  const onProgress = (done: number, total: number) => {
    const at = now();
    if (at - lastProgress < PROGRESS_INTERVAL_MS) return;
    lastProgress = at;
    post({ kind: 'progress', done, total }, []);
  };
  try {
    if (job.kind === 'run') {
      const series = runToSeries(job.document, job.settings ?? job.document.motion.run, onProgress, () => now() - started);
      post({ kind: 'run-done', series }, transferablesOf(series));
    } else if (job.kind === 'matrix') {
      const result = runMatrix(job.document, job.settings, { onProgress });
      post({ kind: 'matrix-done', result, elapsedMs: now() - started }, []);
    } else {
      const record = sweepSheet(job.document, job.settings, { onProgress });
      const series = sweepSeries(job.document, record, now() - started);
      post({ kind: 'sweep-done', series }, transferablesOf(series));
    }
  } catch (error) {
    post({ kind: 'failed', message: error instanceof Error ? error.message : String(error) }, []);
  }
}
