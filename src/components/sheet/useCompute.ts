import { useEffect, useRef, useState } from 'react';
import type { ComputeReply, ComputeRequest } from '../../workers/compute-protocol';

type Computed = Extract<ComputeReply, { type: 'computed' }>;

/**
 * Recomputes the sheet in a Web Worker on every change, without a debounce: a request goes out at
 * once when the worker is idle; while it is busy only the newest document waits (older ones are
 * dropped), so fast typing never queues up solves. Only the reply to the newest request is kept.
 * `derive` asks for the step-by-step derivation too (the page asks once it is on screen).
 */
export function useCompute(document: unknown, derive = true) {
  const worker = useRef<Worker | null>(null);
  const latest = useRef(0);
  const busy = useRef(false);
  const waiting = useRef<ComputeRequest | null>(null);
  const [reply, setReply] = useState<Computed | null>(null);
  const [lastGood, setLastGood] = useState<Extract<Computed, { ok: true }> | null>(null);
  const [pending, setPending] = useState(true);

  useEffect(() => {
    const created = new Worker(new URL('../../workers/compute.worker.ts', import.meta.url), { type: 'module' });
    busy.current = false;
    created.onmessage = (event: MessageEvent<ComputeReply>) => {
      const message = event.data;
      busy.current = false;
      const next = waiting.current;
      if (next) {
        waiting.current = null;
        busy.current = true;
        created.postMessage(next);
      }
      if (message.type !== 'computed' || message.id !== latest.current) return;
      // The worker's own time for this recompute, for the page benchmark (performance timeline, no UI).
      performance.mark('slipless:worker-compute', { detail: message.elapsedMs });
      setReply(message);
      if (message.ok) setLastGood(message);
      setPending(false);
    };
    worker.current = created;
    if (waiting.current) {
      busy.current = true;
      created.postMessage(waiting.current);
      waiting.current = null;
    }
    return () => created.terminate();
  }, []);

  useEffect(() => {
    setPending(true);
    const request: ComputeRequest = { type: 'compute', id: ++latest.current, document, derive };
    if (busy.current || !worker.current) waiting.current = request;
    else {
      busy.current = true;
      worker.current.postMessage(request);
    }
  }, [document, derive]);

  return { reply, lastGood, pending };
}
