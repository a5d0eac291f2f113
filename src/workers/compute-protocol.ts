/**
 * The message protocol of the compute worker, as a pure function so that it can be tested
 * without a worker: a document as written goes in, the parsed SI document, the JSON-ready
 * results, the derivation entries, every located issue and how each written quantity reads come out.
 */
import type { PlainSheetResult } from '../lib/kinematics';
import type { DerivationEntry } from '../lib/sheet/derivation';
import { createFingerMemory, evaluateSheet, type FingerMemory } from '../lib/sheet/evaluate';
import { createDocumentTrail, getAt, setAt } from '../lib/sheet/document-path';
import { createReadingsReader, readDocument, type DocumentReadings } from '../lib/sheet/readings';
import { QUANTITY_KINDS } from '../lib/sheet/quantity-kinds';
import { createEditReader, editablePaths, parseSheet, type EditablePath, type SheetIssue, type SheetReader } from '../lib/sheet/schema';
import type { SheetDocument } from '../lib/sheet/types';
import { nextTask, warmUpInTasks } from './warm-up';

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

/**
 * Sent by the page once the sheet is drawn, before the first edit: while nothing else is asked, the worker recomputes
 * edits of this document (results dropped), so that the user's first edits find the code compiled. Cold, V8 spends a
 * fresh worker's first edits interpreting and compiling (in Chromium 75, 7, 4 and 5 ms, then 1 ms, for the demo sheet).
 */
export interface ComputeWarmUp {
  type: 'warm-up';
  /** The document the page shows. */
  document: unknown;
}

/**
 * Recomputes a warm-up makes, one per task, so that a request posted meanwhile waits for one at most. Each is an edit of
 * one field; every WHOLE_READ_EVERY-th reads the document whole, as the worker's first request does. After 40 rounds
 * Chromium still ran much of an edit's code unoptimised (the page's edits took 1.1 to 1.8 ms, 0.9 to 1.0 after 200 and
 * 0.6 to 0.7 after 1,000): the code of one recompute runs once per round, so it takes many rounds, about a second of an
 * idle worker, to be optimised. A request stops the warm-up wherever it is.
 */
export const WARM_UP_ROUNDS = 1000;
const WHOLE_READ_EVERY = 8;

function isWarmUp(message: unknown): message is ComputeWarmUp {
  return message !== null && typeof message === 'object' && (message as Record<string, unknown>).type === 'warm-up';
}

function isComputeRequest(message: unknown): message is ComputeRequest {
  if (message === null || typeof message !== 'object') return false;
  const { type, id, derive } = message as Record<string, unknown>;
  return type === 'compute' && typeof id === 'number' && Number.isInteger(id) && (derive === undefined || typeof derive === 'boolean');
}

/** The refusal of a document nested deeper than its readings go, located where it passes that depth (no sheet nests so deep). */
function tooDeep(id: number, issue: SheetIssue, readings: DocumentReadings, elapsedMs: number): ComputeReply {
  return { type: 'computed', id, ok: false, issues: [issue], readings, elapsedMs };
}

/** How a document is read: its quantity texts (for the editor's hints) and the sheet, and what is kept of its fingers between evaluations. */
export interface DocumentReaders {
  readings: (document: unknown) => DocumentReadings;
  sheet: SheetReader;
  /** Nothing is kept when absent. */
  fingers?: FingerMemory;
}

/** Every document read whole, as the server reads them. */
const WHOLE_DOCUMENTS: DocumentReaders = { readings: readDocument, sheet: parseSheet };

/**
 * Readers for the documents of one editor, each an edit of the one before: an edit is read by what it changed (see
 * createReadingsReader, createEditReader), found once for both on their one trail, and the fingers it left alone are
 * not compiled again, nor their curvature, acceleration and plain result computed again (createFingerMemory).
 */
export function createEditReaders(): DocumentReaders {
  const trail = createDocumentTrail();
  return { readings: createReadingsReader(trail), sheet: createEditReader(trail), fingers: createFingerMemory() };
}

/**
 * Answers one message: reads, solves and (unless asked not to) derives the sheet, or reports where it is wrong. The
 * worker reads with its own edit readers (createEditReaders), since its documents come from one editor; the server reads
 * every document whole.
 */
export function computeSheet(message: unknown, now: () => number = () => performance.now(), readers: DocumentReaders = WHOLE_DOCUMENTS): ComputeReply {
  if (!isComputeRequest(message)) return { type: 'refused', message: 'expected {type: "compute", id: integer, document}' };
  const started = now();
  const { sheet: read, fingers } = readers;
  const readings = readers.readings(message.document);
  if (readings.tooDeep) return tooDeep(message.id, readings.tooDeep, readings, now() - started);
  if (message.derive === false) {
    const plain = evaluateSheet(message.document, { read, fingers });
    if (!plain.ok) return { type: 'computed', id: message.id, ok: false, issues: plain.error.issues, readings, elapsedMs: now() - started };
    return { type: 'computed', id: message.id, ok: true, document: plain.value.doc, result: plain.value.result, readings, elapsedMs: now() - started };
  }
  const evaluated = evaluateSheet(message.document, { derive: true, read, fingers });
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
export function computeSheetInSteps(message: unknown, now: () => number = () => performance.now(), readers: DocumentReaders = WHOLE_DOCUMENTS): ComputeSteps {
  if (!isComputeRequest(message) || message.derive !== false) return { first: computeSheet(message, now, readers) };
  const started = now();
  const readings = readers.readings(message.document);
  if (readings.tooDeep) return { first: tooDeep(message.id, readings.tooDeep, readings, now() - started) };
  const evaluated = evaluateSheet(message.document, { graspQualityLater: true, read: readers.sheet, fingers: readers.fingers });
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

/** A number as written, with or without a unit after it ("13.5 mm", "-2 deg", "0.01"). */
const WRITTEN_NUMBER = /^\s*(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(\s*[^\d\s.].*)?$/i;

/**
 * The field's value moved away from zero by `step` (relative; `step` itself for zero), written as text as a user types
 * it (a number in SI gets its kind's SI unit), or undefined when it is not a written number (an expression).
 */
function nearbyText(value: unknown, kind: EditablePath['kind'], step: number): string | undefined {
  const move = (n: number) => (n === 0 ? step : n * (1 + step));
  if (typeof value === 'number') return Number.isFinite(value) ? `${move(value)} ${QUANTITY_KINDS[kind].si}` : undefined;
  if (typeof value !== 'string') return undefined;
  const match = WRITTEN_NUMBER.exec(value);
  return match ? `${move(Number(match[1]))}${match[2] ?? ''}` : undefined;
}

/**
 * The compute worker's answer to each message: a request is answered at once with the worker's own edit readers, and a
 * grasp quality that follows in a second reply goes out after a deferred task unless a newer message came meanwhile;
 * a warm-up makes its rounds one per deferred task, on edit readers of its own (the requests' readers never see its
 * documents), and stops once a request arrives.
 */
export function createComputeHandler(post: (reply: ComputeReply) => void, defer: (next: () => void) => void = nextTask): (message: unknown) => void {
  // This worker's documents come from one editor, each an edit of the one before.
  const readEdits = createEditReaders();
  // Counts messages: deferred work checks that no message came after the one it belongs to.
  let messages = 0;
  return (message) => {
    const asked = ++messages;
    if (isWarmUp(message)) {
      if (message.document !== null && typeof message.document === 'object') warmUp(message.document, asked);
      return;
    }
    const { first, later } = computeSheetInSteps(message, () => performance.now(), readEdits);
    post(first);
    // A newer document makes this one's grasp quality moot (the page keeps only the newest reply); after a deferred
    // task, so that a document the page sent meanwhile is read first.
    if (later) defer(() => { if (asked === messages) post(later()); });
  };

  function warmUp(shown: object, asked: number): void {
    const fields = editablePaths(shown);
    let readers = createEditReaders();
    let edited: unknown = shown;
    const round = (index: number) => {
      // The last round reads the document shown again, so the readings kept between documents are its own again.
      if (index === WARM_UP_ROUNDS - 1) edited = shown;
      else {
        if (index % WHOLE_READ_EVERY === 0) readers = createEditReaders();
        const field = fields[index % Math.max(fields.length, 1)];
        const text = field === undefined ? undefined : nearbyText(getAt(edited, field.path), field.kind, 1e-3);
        // A structured clone each round, as each request arrives.
        edited = structuredClone(field === undefined || text === undefined ? edited : setAt(edited, field.path, text));
      }
      computeSheetInSteps({ type: 'compute', id: 0, document: edited, derive: false }, () => 0, readers).later?.();
    };
    warmUpInTasks(WARM_UP_ROUNDS, round, () => asked === messages, defer);
  }
}
