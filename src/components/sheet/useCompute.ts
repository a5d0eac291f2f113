import { useEffect, useRef, useState } from 'react';
import { flushSync } from 'react-dom';
import type { ComputeReply, ComputeRequest, ComputeWarmUp } from '../../workers/compute-protocol';
import { afterNextPaint } from './useIdle';

type Computed = Extract<ComputeReply, { type: 'computed' }>;
/** A successful evaluation of the sheet editor's worker. */
export type ComputedSheet = Extract<Computed, { ok: true }>;

/** The sheet editor's worker: evaluation with the derivation. */
function createComputeWorker(): Worker {
  return new Worker(new URL('../../workers/compute.worker.ts', import.meta.url), { type: 'module' });
}

type ComputedLike = { type: 'computed'; id: number; ok: boolean; elapsedMs?: number };

interface ComputeOptions {
  /** Another worker answering the same request (with `extra` fields) by `{type: 'computed', id, ok}`. */
  create?: () => Worker;
  extra?: Readonly<Record<string, unknown>>;
  /** Ask for the step-by-step derivation too (the sheet page asks once it is on screen). */
  derive?: boolean;
  /**
   * The reply for this document without the derivation, evaluated before the page was drawn (the sheet
   * page's server render): shown at once, and the worker is started once the hydrated page has been
   * painted (or at the first change), so it never delays the first results yet is warm for the first edit. The worker
   * is given this document to warm up with (ComputeWarmUp), so only the compute worker takes `initial`.
   */
  initial?: { document: unknown; reply: ComputedLike };
}

/** The inputs of one request, compared by identity: a reply answers what is shown when all three are the same. */
interface Asked {
  document: unknown;
  derive: boolean;
  extra: Readonly<Record<string, unknown>> | undefined;
}

interface ComputeState<Reply extends ComputedLike> {
  reply: Reply | null;
  lastGood: Extract<Reply, { ok: true }> | null;
  pending: boolean;
}

/**
 * Recomputes the sheet in a Web Worker on every change, without a debounce: a request goes out at
 * once when the worker is idle; while it is busy only the newest document waits (older ones are
 * dropped), so fast typing never queues up solves. Only the reply to the newest request is kept.
 */
export function useCompute(document: unknown, options?: ComputeOptions): ComputeState<Computed>;
export function useCompute<Reply extends ComputedLike>(document: unknown, options: ComputeOptions): ComputeState<Reply>;
export function useCompute(
  document: unknown,
  { create = createComputeWorker, extra, derive = true, initial }: ComputeOptions = {},
): { reply: ComputedLike | null; lastGood: ComputedLike | null; pending: boolean } {
  const worker = useRef<Worker | null>(null);
  const latest = useRef(0);
  const busy = useRef(false);
  const marked = useRef(0);
  const waiting = useRef<ComputeRequest | null>(null);
  const [reply, setReply] = useState<ComputedLike | null>(initial?.reply ?? null);
  const [lastGood, setLastGood] = useState<ComputedLike | null>(initial?.reply.ok ? initial.reply : null);
  // What the newest request asked and what the shown reply answered: pending is read from the two in the render of the
  // change itself, so a keystroke renders the editor once rather than again from an effect that marks it pending.
  const requested = useRef<Asked | null>(null);
  const [answered, setAnswered] = useState<Asked | null>(initial ? { document: initial.document, derive: false, extra } : null);
  // Set once the worker should exist: at once without a first reply, else after the first paint or when asked for more than the first reply.
  const [wanted, setWanted] = useState(!initial);

  useEffect(() => (wanted ? undefined : afterNextPaint(() => setWanted(true))), [wanted]);

  useEffect(() => {
    if (!wanted) return;
    const created = create();
    busy.current = false;
    created.onmessage = (event: MessageEvent<ComputedLike | { type: 'refused' }>) => {
      const message = event.data;
      busy.current = false;
      const next = waiting.current;
      if (next) {
        waiting.current = null;
        busy.current = true;
        created.postMessage(next);
      }
      if (message.type !== 'computed' || message.id !== latest.current) return;
      // The worker's own time until this recompute's results show, for the page benchmark (performance timeline, no UI);
      // a grasp quality that follows in a second reply is not part of it.
      if (message.id !== marked.current) performance.mark('slipless:worker-compute', { detail: message.elapsedMs });
      marked.current = message.id;
      // Rendered in this message's own task: left to the scheduler, the render waited a task, and a frame due in between
      // was drawn without the results, holding them back by a frame.
      flushSync(() => {
        setReply(message);
        if (message.ok) setLastGood(message);
        setAnswered(requested.current);
      });
    };
    worker.current = created;
    if (waiting.current) {
      busy.current = true;
      created.postMessage(waiting.current);
      waiting.current = null;
    } else if (initial) {
      // Recomputes edits of the sheet shown while the page is idle; a request stops it and is answered at once.
      const warmUp: ComputeWarmUp = { type: 'warm-up', document: initial.document };
      created.postMessage(warmUp);
    }
    return () => {
      created.terminate();
      worker.current = null;
    };
  }, [create, wanted]);

  useEffect(() => {
    // The first reply already answers the document as drawn, as long as no derivation is asked for.
    if (initial && document === initial.document && !derive && latest.current === 0) return;
    setWanted(true);
    requested.current = { document, derive, extra };
    const request: ComputeRequest = { type: 'compute', id: ++latest.current, document, derive, ...extra };
    if (busy.current || !worker.current) waiting.current = request;
    else {
      busy.current = true;
      worker.current.postMessage(request);
    }
  }, [document, derive, extra, initial]);

  const pending = answered === null || answered.document !== document || answered.derive !== derive || answered.extra !== extra;
  return { reply, lastGood, pending };
}
