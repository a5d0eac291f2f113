/**
 * The message protocol of the compute worker, as a pure function so that it can be tested
 * without a worker: a document as written goes in, the parsed SI document, the JSON-ready
 * results, the derivation entries, every located issue and how each written quantity reads come out.
 */
import type { PlainSheetResult } from '../lib/kinematics';
import type { DerivationEntry } from '../lib/sheet/derivation';
import { evaluateSheet } from '../lib/sheet/evaluate';
import { readDocument, type DocumentReadings } from '../lib/sheet/readings';
import { parseSheet, type SheetIssue, type SheetReader } from '../lib/sheet/schema';
import type { SheetDocument } from '../lib/sheet/types';

export interface ComputeRequest {
  type: 'compute';
  /** Increases with every request; replies carry it so that the page keeps only the newest. */
  id: number;
  document: unknown;
  /** Whether to derive the outputs step by step (the page asks only once the derivation is on screen); true when absent. */
  derive?: boolean;
}

export type ComputeReply =
  | {
      type: 'computed';
      id: number;
      ok: true;
      document: SheetDocument;
      result: PlainSheetResult;
      /** Absent when the request did not ask for it. */
      derivation?: DerivationEntry[];
      /** True when `result` has no grasp quality yet: a second reply with the same id brings the complete result. */
      graspQualityPending?: true;
      /** How the document's quantity texts and variables read, for the editor's hints. */
      readings: DocumentReadings;
      elapsedMs: number;
    }
  | { type: 'computed'; id: number; ok: false; issues: SheetIssue[]; readings: DocumentReadings; elapsedMs: number }
  | { type: 'refused'; message: string };

function isComputeRequest(message: unknown): message is ComputeRequest {
  if (message === null || typeof message !== 'object') return false;
  const { type, id, derive } = message as Record<string, unknown>;
  return type === 'compute' && typeof id === 'number' && Number.isInteger(id) && (derive === undefined || typeof derive === 'boolean');
}

/**
 * Answers one message: reads, solves and (unless asked not to) derives the sheet, or reports where it is wrong. The
 * worker reads with its own edit reader (createEditReader), since its documents come from one editor; the server reads
 * every document whole.
 */
export function computeSheet(message: unknown, now: () => number = () => performance.now(), read: SheetReader = parseSheet): ComputeReply {
  if (!isComputeRequest(message)) return { type: 'refused', message: 'expected {type: "compute", id: integer, document}' };
  const started = now();
  const readings = readDocument(message.document);
  if (message.derive === false) {
    const plain = evaluateSheet(message.document, { read });
    if (!plain.ok) return { type: 'computed', id: message.id, ok: false, issues: plain.error.issues, readings, elapsedMs: now() - started };
    return { type: 'computed', id: message.id, ok: true, document: plain.value.doc, result: plain.value.result, readings, elapsedMs: now() - started };
  }
  const evaluated = evaluateSheet(message.document, { derive: true, read });
  if (!evaluated.ok) return { type: 'computed', id: message.id, ok: false, issues: evaluated.error.issues, readings, elapsedMs: now() - started };
  const { doc, result, derivation } = evaluated.value;
  return { type: 'computed', id: message.id, ok: true, document: doc, result, derivation, readings, elapsedMs: now() - started };
}

/** The replies to one message: `first` at once and, when the contacts were not seen before, `later` the complete one. */
export interface ComputeSteps {
  first: ComputeReply;
  /** Computes the grasp quality and gives the reply computeSheet would have given (with the same id). */
  later?: () => ComputeReply;
}

/**
 * Answers one message as computeSheet does, but without the derivation a grasp quality not cached yet comes in a second
 * reply: the page shows every other result at once (the grasp quality is the one costly part, and any move of a contact
 * asks for it anew). With the derivation the reply is complete at once, since the derivation shows the grasp quality.
 */
export function computeSheetInSteps(message: unknown, now: () => number = () => performance.now(), read: SheetReader = parseSheet): ComputeSteps {
  if (!isComputeRequest(message) || message.derive !== false) return { first: computeSheet(message, now, read) };
  const started = now();
  const readings = readDocument(message.document);
  const evaluated = evaluateSheet(message.document, { graspQualityLater: true, read });
  const elapsedMs = now() - started;
  if (!evaluated.ok) return { first: { type: 'computed', id: message.id, ok: false, issues: evaluated.error.issues, readings, elapsedMs } };
  const { id } = message;
  const { doc, result, graspQualityLater } = evaluated.value;
  if (!graspQualityLater) return { first: { type: 'computed', id, ok: true, document: doc, result, readings, elapsedMs } };
  return {
    first: { type: 'computed', id, ok: true, document: doc, result, graspQualityPending: true, readings, elapsedMs },
    later: () => {
      const laterStarted = now();
      const complete = graspQualityLater();
      const total = elapsedMs + now() - laterStarted;
      return complete.ok
        ? { type: 'computed', id, ok: true, document: doc, result: complete.value, readings, elapsedMs: total }
        : { type: 'computed', id, ok: false, issues: complete.error.issues, readings, elapsedMs: total };
    },
  };
}
