import { useEffect, useRef, useState } from 'react';
import type { ComputeReply, ComputeRequest } from '../../workers/compute-protocol';

export const COMPUTE_DEBOUNCE_MS = 150;

type Computed = Extract<ComputeReply, { type: 'computed' }>;

/**
 * Recomputes the sheet in a Web Worker a short while after the last change; only the reply to
 * the newest request is kept, so a slow solve never overwrites a newer one.
 */
export function useCompute(document: unknown) {
  const worker = useRef<Worker | null>(null);
  const latest = useRef(0);
  const [reply, setReply] = useState<Computed | null>(null);
  const [lastGood, setLastGood] = useState<Extract<Computed, { ok: true }> | null>(null);
  const [pending, setPending] = useState(true);

  useEffect(() => {
    const created = new Worker(new URL('../../workers/compute.worker.ts', import.meta.url), { type: 'module' });
    created.onmessage = (event: MessageEvent<ComputeReply>) => {
      const message = event.data;
      if (message.type !== 'computed' || message.id !== latest.current) return;
      // The worker's own time for this recompute, for the page benchmark (performance timeline, no UI).
      performance.mark('slipless:worker-compute', { detail: message.elapsedMs });
      setReply(message);
      if (message.ok) setLastGood(message);
      setPending(false);
    };
    worker.current = created;
    return () => created.terminate();
  }, []);

  useEffect(() => {
    setPending(true);
    const id = ++latest.current;
    const timer = window.setTimeout(() => {
      const request: ComputeRequest = { type: 'compute', id, document };
      worker.current?.postMessage(request);
    }, COMPUTE_DEBOUNCE_MS);
    return () => window.clearTimeout(timer);
  }, [document]);

  return { reply, lastGood, pending };
}
