/**
 * The message protocol of the run worker: the page posts one job (a run toward the sheet's target
 * or a sweep of one input), the worker answers with progress messages and then exactly one result
 * or failure. performJob is the whole worker apart from the message plumbing, so it runs in tests.
 */
import { runSheet, sweepSheet } from '../lib/kinematics';
import { runMatrix, type MatrixResult } from '../lib/sheet/matrix';
import type { MatrixSettings, RunSettings, SheetDocument, SweepSettings } from '../lib/sheet/types';
import { runSeries, sweepSeries, transferablesOf, type RunSeries, type SweepSeries } from '../lib/view/series';

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

/** The run looks at the clock about this many times, whatever its length. */
const PROGRESS_CHECKS = 200;
/**
 * Progress goes out at most once in this many milliseconds: each message costs the worker and the page a task, and the
 * page shows at most one a frame, so a short run posts none and a long one a few a frame's worth apart.
 */
export const PROGRESS_INTERVAL_MS = 30;

function isJob(value: unknown): value is WorkerJob {
  if (value === null || typeof value !== 'object') return false;
  const job = value as Record<string, unknown>;
  const hasDocument = job.document !== null && typeof job.document === 'object';
  if (job.kind === 'run') return hasDocument;
  return (job.kind === 'sweep' || job.kind === 'matrix') && hasDocument && job.settings !== null && typeof job.settings === 'object';
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
      const settings = job.settings ?? job.document.motion.run;
      const progressEvery = Math.max(1, Math.ceil(settings.maxTicks / PROGRESS_CHECKS));
      const record = runSheet(job.document, { settings, onProgress, progressEvery });
      const series = runSeries(job.document, record, now() - started);
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
