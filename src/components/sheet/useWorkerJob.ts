import { useCallback, useEffect, useRef, useState } from 'react';
import { flushSync } from 'react-dom';
import type { LogComparison } from '../../lib/logs/compare';
import type { MatrixResult } from '../../lib/sheet/matrix';
import type { RunSettings } from '../../lib/sheet/types';
import { formatBytes } from '../../lib/view/bytes';
import type { RunSeries, SweepSeries } from '../../lib/view/series';
import type { LogCompareReply, LogCompareRequest } from '../../workers/log-compare-protocol';
import type { WarmUp, WorkerJob, WorkerReply } from '../../workers/run-protocol';

export type JobState<T> =
  | { status: 'idle' }
  | { status: 'running'; done: number; total: number; detail?: string }
  | { status: 'done'; result: T; detail?: string }
  | { status: 'failed'; message: string; issues?: string[] }
  | { status: 'cancelled'; done: number; total: number };

/** What one reply of a worker means for its job; null for a reply that changes nothing. */
export type JobEvent<T> =
  | { kind: 'progress'; done: number; total: number; detail?: string }
  | { kind: 'done'; result: T; detail?: string }
  | { kind: 'failed'; message: string; issues?: string[] }
  | { kind: 'cancelled' }
  | null;

/** One kind of worker job: how to start its worker, read its replies and, if it can hear one, ask it to stop. */
export interface WorkerKind<J, T> {
  create: () => Worker;
  read: (reply: unknown) => JobEvent<T>;
  /** Posted to cancel. Without one, cancel terminates the worker: a loop that never yields cannot hear a message. */
  cancelMessage?: unknown;
  post: (worker: Worker, job: J) => void;
  /** Posted once to a worker made ahead of its first job, with the job the page expects: work that compiles that job's code, answered by nothing. */
  warmUp?: (worker: Worker, expected: J) => void;
}

function runKind<K extends 'run-done' | 'sweep-done'>(doneKind: K): WorkerKind<WorkerJob, K extends 'run-done' ? RunSeries : SweepSeries> {
  return {
    create: () => new Worker(new URL('../../workers/run.worker.ts', import.meta.url), { type: 'module' }),
    post: (worker, job) => worker.postMessage(job),
    read: (message) => {
      const reply = message as WorkerReply;
      if (reply.kind === 'progress') return { kind: 'progress', done: reply.done, total: reply.total };
      if (reply.kind === 'failed') return { kind: 'failed', message: reply.message };
      return reply.kind === doneKind ? { kind: 'done', result: reply.series as K extends 'run-done' ? RunSeries : SweepSeries } : null;
    },
  };
}

/** Ticks of each warm-up run: enough for the run's hot functions to be compiled, about a tenth of a second's work for a cold worker. */
const WARM_UP_TICKS = 500;
/** Largest gain × time step a warm-up stretches to: beyond it the controller overshoots, a motion the sheet's own run never makes. */
const WARM_UP_MAX_STEP = 0.5;

/**
 * The sheet's run settings for a warm-up: at most WARM_UP_TICKS ticks with the time step stretched so that they span the
 * whole run. Its last ticks, near the target, take branches (tiny errors, warnings of a slowing object) that the first
 * ticks never reach: a warm-up of the first 500 ticks alone left the real run to compile them.
 */
export function warmUpSettings(settings: RunSettings): RunSettings {
  const maxTicks = Math.min(settings.maxTicks, WARM_UP_TICKS);
  const dt = Math.max(settings.dt, Math.min(settings.dt * (settings.maxTicks / Math.max(1, maxTicks)), WARM_UP_MAX_STEP / settings.gain));
  return { ...settings, dt, maxTicks };
}

/** Runs toward the sheet's target, in ticks; a warm-up makes short runs of the expected sheet. */
export const RUN_JOBS: WorkerKind<WorkerJob, RunSeries> = {
  ...runKind('run-done'),
  warmUp: (worker, expected) => {
    if (expected.kind !== 'run') return;
    const warmUp: WarmUp = { kind: 'warm-up', document: expected.document, settings: warmUpSettings(expected.settings ?? expected.document.motion.run) };
    worker.postMessage(warmUp);
  },
};
/** Sweeps of one input, in values. */
export const SWEEP_JOBS = runKind('sweep-done');

/** A matrix computed in the browser, with the worker's wall time. */
export interface LocalMatrix {
  result: MatrixResult;
  elapsedMs: number;
}

/** Test matrices, in runs; cancel terminates the worker (a run never yields). */
export const MATRIX_JOBS: WorkerKind<WorkerJob, LocalMatrix> = {
  create: RUN_JOBS.create,
  post: RUN_JOBS.post,
  read: (message) => {
    const reply = message as WorkerReply;
    if (reply.kind === 'progress') return { kind: 'progress', done: reply.done, total: reply.total };
    if (reply.kind === 'failed') return { kind: 'failed', message: reply.message };
    return reply.kind === 'matrix-done' ? { kind: 'done', result: { result: reply.result, elapsedMs: reply.elapsedMs } } : null;
  },
};

/** "1.2 MiB of 45 MiB · 12,345 samples · 45,000 samples/s": what a progress or result message of the log worker says in words. */
function logReadingDetail(reply: { bytesRead: number; totalBytes: number; samples: number; elapsedMs: number }): string {
  const rate = reply.elapsedMs > 0 ? Math.round((1000 * reply.samples) / reply.elapsedMs) : 0;
  return `${formatBytes(reply.bytesRead)} of ${formatBytes(reply.totalBytes)} · ${reply.samples.toLocaleString('en')} samples · ${rate.toLocaleString('en')} samples/s`;
}

/** A comparison run in the browser, with the number of progress messages the worker posted on the way. */
export interface LocalComparison {
  comparison: LogComparison;
  progressMessages: number;
}

/** Comparisons of a local log file with a sheet, in file bytes; the worker hears a cancel between chunks. */
export const LOG_COMPARE_JOBS: WorkerKind<LogCompareRequest, LocalComparison> = {
  create: () => new Worker(new URL('../../workers/log-compare.worker.ts', import.meta.url), { type: 'module' }),
  post: (worker, request) => worker.postMessage(request),
  read: (message) => {
    const reply = message as LogCompareReply;
    switch (reply.kind) {
      case 'progress':
        return { kind: 'progress', done: reply.bytesRead, total: reply.totalBytes, detail: logReadingDetail(reply) };
      case 'done':
        return {
          kind: 'done',
          result: { comparison: reply.result, progressMessages: reply.progressMessages },
          detail: `${logReadingDetail(reply)} in ${(reply.elapsedMs / 1000).toFixed(1)} s`,
        };
      case 'failed':
        return { kind: 'failed', message: reply.message, issues: reply.issues };
      case 'cancelled':
        return { kind: 'cancelled' };
      default:
        return null;
    }
  },
  cancelMessage: { type: 'cancel' },
};

/**
 * Runs one worker job at a time. The worker stays alive between jobs, so later runs use code the
 * engine has already optimised. Cancel posts the kind's cancel message, or terminates the worker
 * when the kind has none; a job started while a cancelled one still winds down gets a fresh
 * worker, so no late reply of the old job is read as the new one's. Unmounting terminates it too.
 * `start` resolves with the job's final state.
 */
export function useWorkerJob<J, T>(kind: WorkerKind<J, T>, options: { warmWith?: J } = {}) {
  const [state, setState] = useState<JobState<T>>({ status: 'idle' });
  const workerRef = useRef<Worker | null>(null);
  const runningRef = useRef(false);
  const windingDownRef = useRef(false);
  const progressRef = useRef({ done: 0, total: 0 });
  const settleRef = useRef<((state: JobState<T>) => void) | null>(null);
  // Progress shows at most once a frame: a worker may post hundreds of messages in a few milliseconds, and each render would delay the result.
  const frameRef = useRef(0);

  const finish = useCallback((final: JobState<T>) => {
    cancelAnimationFrame(frameRef.current);
    frameRef.current = 0;
    runningRef.current = false;
    // The outcome renders, and its effects (the charts) draw, in the task that received it: otherwise the browser may
    // paint the page between the results' markup and their charts, a full page paint more before the plots show.
    flushSync(() => setState(final));
    settleRef.current?.(final);
    settleRef.current = null;
  }, []);

  const terminate = useCallback(() => {
    workerRef.current?.terminate();
    workerRef.current = null;
    runningRef.current = false;
    windingDownRef.current = false;
  }, []);

  const cancel = useCallback(() => {
    if (!runningRef.current) return;
    if (kind.cancelMessage === undefined) terminate();
    else {
      workerRef.current?.postMessage(kind.cancelMessage);
      windingDownRef.current = true;
    }
    finish({ status: 'cancelled', ...progressRef.current });
  }, [finish, kind, terminate]);

  const start = useCallback(
    (job: J): Promise<JobState<T>> => {
      if (runningRef.current) cancel();
      if (windingDownRef.current) terminate();
      const worker = workerRef.current ?? kind.create();
      workerRef.current = worker;
      runningRef.current = true;
      progressRef.current = { done: 0, total: 0 };
      setState({ status: 'running', done: 0, total: 0 });
      worker.onmessage = (event: MessageEvent<unknown>) => {
        const reading = kind.read(event.data);
        if (reading === null) return;
        if (windingDownRef.current) {
          // The cancelled job's last word: the worker is free again.
          if (reading.kind !== 'progress') windingDownRef.current = false;
          return;
        }
        if (reading.kind === 'progress') {
          progressRef.current = { done: reading.done, total: reading.total };
          const shown: JobState<T> = { status: 'running', done: reading.done, total: reading.total, ...(reading.detail ? { detail: reading.detail } : {}) };
          cancelAnimationFrame(frameRef.current);
          frameRef.current = requestAnimationFrame(() => {
            frameRef.current = 0;
            if (runningRef.current) setState(shown);
          });
        } else if (reading.kind === 'failed') finish({ status: 'failed', message: reading.message, ...(reading.issues ? { issues: reading.issues } : {}) });
        else if (reading.kind === 'cancelled') finish({ status: 'cancelled', ...progressRef.current });
        else finish({ status: 'done', result: reading.result, ...(reading.detail ? { detail: reading.detail } : {}) });
      };
      worker.onerror = (event) => {
        terminate();
        finish({ status: 'failed', message: event.message || 'The worker stopped with an error.' });
      };
      const settled = new Promise<JobState<T>>((resolve) => {
        settleRef.current = resolve;
      });
      kind.post(worker, job);
      return settled;
    },
    [cancel, finish, kind, terminate],
  );

  // A warm worker has loaded its script, and warmed up with the job expected, before the first job, so a click only posts
  // the job. Only the worker's creation waits for the expected job; later versions of it are not posted.
  const expectedRef = useRef(options.warmWith);
  expectedRef.current = options.warmWith;
  const warm = options.warmWith !== undefined;
  useEffect(() => {
    if (!warm || workerRef.current) return;
    const worker = kind.create();
    workerRef.current = worker;
    if (expectedRef.current !== undefined) kind.warmUp?.(worker, expectedRef.current);
  }, [warm, kind]);

  useEffect(() => () => {
    cancelAnimationFrame(frameRef.current);
    terminate();
    settleRef.current?.({ status: 'idle' });
  }, [terminate]);

  return { state, start, cancel };
}
