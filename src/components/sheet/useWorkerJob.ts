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
 * Runs one worker job at a time. The worker stays alive between jobs, so later runs use code the
 * engine has already optimised; cancel terminates it at once (the core loop never yields, so a
 * message could not stop it) and the next job starts a fresh one. Unmounting terminates it too.
 */
export function useWorkerJob<K extends keyof SeriesOf>(doneKind: K) {
  const [state, setState] = useState<JobState<SeriesOf[K]>>({ status: 'idle' });
  const workerRef = useRef<Worker | null>(null);
  const runningRef = useRef(false);
  const progressRef = useRef({ done: 0, total: 0 });

  const terminate = useCallback(() => {
    workerRef.current?.terminate();
    workerRef.current = null;
    runningRef.current = false;
  }, []);

  const start = useCallback(
    (job: WorkerJob) => {
      if (runningRef.current) terminate();
      const worker = workerRef.current ?? new Worker(new URL('../../workers/run.worker.ts', import.meta.url), { type: 'module' });
      workerRef.current = worker;
      runningRef.current = true;
      progressRef.current = { done: 0, total: 0 };
      setState({ status: 'running', done: 0, total: 0 });
      worker.onmessage = (event: MessageEvent<WorkerReply>) => {
        const reply = event.data;
        if (reply.kind === 'progress') {
          progressRef.current = { done: reply.done, total: reply.total };
          setState({ status: 'running', done: reply.done, total: reply.total });
          return;
        }
        runningRef.current = false;
        if (reply.kind === 'failed') setState({ status: 'failed', message: reply.message });
        else if (reply.kind === doneKind) setState({ status: 'done', result: reply.series as SeriesOf[K] });
      };
      worker.onerror = (event) => {
        terminate();
        setState({ status: 'failed', message: event.message || 'The worker stopped with an error.' });
      };
      worker.postMessage(job);
    },
    [doneKind, terminate],
  );

  const cancel = useCallback(() => {
    if (!runningRef.current) return;
    terminate();
    setState({ status: 'cancelled', ...progressRef.current });
  }, [terminate]);

  useEffect(() => terminate, [terminate]);

  return { state, start, cancel };
}
