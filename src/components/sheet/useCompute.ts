import { useEffect, useRef, useState } from 'react';
import type { ComputeReply, ComputeRequest } from '../../workers/compute-protocol';

export const COMPUTE_DEBOUNCE_MS = 150;

type Computed = Extract<ComputeReply, { type: 'computed' }>;

/** The sheet editor's worker: evaluation with the derivation. */
function createComputeWorker(): Worker {
  return new Worker(new URL('../../workers/compute.worker.ts', import.meta.url), { type: 'module' });
}

/**
 * Recomputes the sheet in a Web Worker (the compute worker unless `create` names another that
 * answers the same request with `extra` fields and replies `{type: 'computed', id, ok}`) a short while after the last change; only the reply to
 * the newest request is kept, so a slow solve never overwrites a newer one.
 */
type ComputedLike = { type: 'computed'; id: number; ok: boolean };

interface ComputeOptions {
  create?: () => Worker;
  extra?: Readonly<Record<string, unknown>>;
}

interface ComputeState<Reply extends ComputedLike> {
  reply: Reply | null;
  lastGood: Extract<Reply, { ok: true }> | null;
  pending: boolean;
}

export function useCompute<Reply extends ComputedLike>(document: unknown, options: ComputeOptions): ComputeState<Reply>;
export function useCompute(document: unknown): ComputeState<Computed>;
export function useCompute(
  document: unknown,
  { create = createComputeWorker, extra }: ComputeOptions = {},
): { reply: ComputedLike | null; lastGood: ComputedLike | null; pending: boolean } {
  const worker = useRef<Worker | null>(null);
  const latest = useRef(0);
  const [reply, setReply] = useState<ComputedLike | null>(null);
  const [lastGood, setLastGood] = useState<ComputedLike | null>(null);
  const [pending, setPending] = useState(true);

  useEffect(() => {
    const created = create();
    created.onmessage = (event: MessageEvent<ComputedLike | { type: 'refused' }>) => {
      const message = event.data;
      if (message.type !== 'computed' || message.id !== latest.current) return;
      setReply(message);
      if (message.ok) setLastGood(message);
      setPending(false);
    };
    worker.current = created;
    return () => created.terminate();
  }, [create]);

  useEffect(() => {
    setPending(true);
    const id = ++latest.current;
    const timer = window.setTimeout(() => {
      const request: ComputeRequest = { type: 'compute', id, document, ...extra };
      worker.current?.postMessage(request);
    }, COMPUTE_DEBOUNCE_MS);
    return () => window.clearTimeout(timer);
  }, [document, extra]);

  return { reply, lastGood, pending };
}
