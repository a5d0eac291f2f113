import { useCallback, useEffect, useRef, useState } from 'react';
import type { RunSeries, SweepSeries } from '../../lib/view/series';
import type { WorkerJob, WorkerReply } from '../../workers/run-protocol';

export type JobState<T> =
  | { status: 'idle' }
  | { status: 'running'; done: number; total: number }
  | { status: 'done'; result: T }
  | { status: 'failed'; message: string }
  | { status: 'cancelled'; done: number; total: number };

interface SeriesOf {
  'run-done': RunSeries;
  'sweep-done': SweepSeries;
}

/**
 * Runs one worker job at a time in a fresh worker; cancel terminates the worker at once (the core
 * loop never yields, so a message could not stop it). Unmounting cancels too.
 */
export function useWorkerJob<K extends keyof SeriesOf>(doneKind: K) {
  const [state, setState] = useState<JobState<SeriesOf[K]>>({ status: 'idle' });
  const workerRef = useRef<Worker | null>(null);
  const progressRef = useRef({ done: 0, total: 0 });

  const stop = useCallback(() => {
    workerRef.current?.terminate();
    workerRef.current = null;
  }, []);

  const start = useCallback(
    (job: WorkerJob) => {
      stop();
      const worker = new Worker(new URL('../../workers/run.worker.ts', import.meta.url), { type: 'module' });
      workerRef.current = worker;
      progressRef.current = { done: 0, total: 0 };
      setState({ status: 'running', done: 0, total: 0 });
      worker.onmessage = (event: MessageEvent<WorkerReply>) => {
        const reply = event.data;
        if (reply.kind === 'progress') {
          progressRef.current = { done: reply.done, total: reply.total };
          setState({ status: 'running', done: reply.done, total: reply.total });
          return;
        }
        stop();
        if (reply.kind === 'failed') setState({ status: 'failed', message: reply.message });
        else if (reply.kind === doneKind) setState({ status: 'done', result: reply.series as SeriesOf[K] });
      };
      worker.onerror = (event) => {
        stop();
        setState({ status: 'failed', message: event.message || 'The worker stopped with an error.' });
      };
      worker.postMessage(job);
    },
    [doneKind, stop],
  );

  const cancel = useCallback(() => {
    if (!workerRef.current) return;
    stop();
    setState({ status: 'cancelled', ...progressRef.current });
  }, [stop]);

  useEffect(() => stop, [stop]);

  return { state, start, cancel };
}
