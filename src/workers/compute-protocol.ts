/**
 * The message protocol of the compute worker, as a pure function so that it can be tested
 * without a worker: a document as written goes in, the parsed SI document, the JSON-ready
 * results, the derivation entries, every located issue and how each written quantity reads come out.
 */
import type { PlainSheetResult } from '../lib/kinematics';
import type { DerivationEntry } from '../lib/sheet/derivation';
import { evaluateSheet } from '../lib/sheet/evaluate';
import { readDocument, type DocumentReadings } from '../lib/sheet/readings';
import type { SheetIssue } from '../lib/sheet/schema';
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

/** Answers one message: reads, solves and (unless asked not to) derives the sheet, or reports where it is wrong. */
export function computeSheet(message: unknown, now: () => number = () => performance.now()): ComputeReply {
  if (!isComputeRequest(message)) return { type: 'refused', message: 'expected {type: "compute", id: integer, document}' };
  const started = now();
  const readings = readDocument(message.document);
  if (message.derive === false) {
    const plain = evaluateSheet(message.document);
    if (!plain.ok) return { type: 'computed', id: message.id, ok: false, issues: plain.error.issues, readings, elapsedMs: now() - started };
    return { type: 'computed', id: message.id, ok: true, document: plain.value.doc, result: plain.value.result, readings, elapsedMs: now() - started };
  }
  const evaluated = evaluateSheet(message.document, { derive: true });
  if (!evaluated.ok) return { type: 'computed', id: message.id, ok: false, issues: evaluated.error.issues, readings, elapsedMs: now() - started };
  const { doc, result, derivation } = evaluated.value;
  return { type: 'computed', id: message.id, ok: true, document: doc, result, derivation, readings, elapsedMs: now() - started };
}
