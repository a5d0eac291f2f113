import { createContext, useContext, useLayoutEffect, useRef, useState, useSyncExternalStore } from 'react';
import type { DisplayUnits } from '../../lib/sheet/display-units';
import { getAt, pathText, type DocumentPath } from '../../lib/sheet/document-path';
import type { FieldReading } from '../../lib/sheet/readings';
import type { WarningNote } from '../../lib/sheet/warning-notes';

/** A warning beside the section whose inputs cause it, with its numbers. */
export type MarginWarning = WarningNote;

/** What every field needs besides its own value: a way to change it, the display units and the access; changes only with units or access, never with a keystroke. */
export interface SheetFields {
  update: (path: DocumentPath, value: unknown) => void;
  /** The sheet's display units, which field hints read values back in. */
  units: DisplayUnits;
  readOnly: boolean;
}

/** How the latest evaluation read the sheet, by path text ("hand.fingers[0].roller.radius"). */
export interface SheetReading {
  /** Issues of the sheet reader. */
  issues: ReadonlyMap<string, string>;
  /** How each quantity written as text read. */
  readings: Readonly<Record<string, FieldReading>>;
}

/** A value that components subscribe to in parts: each re-renders only when the part it reads changes. */
export interface Store<Value> {
  get: () => Value;
  subscribe: (listener: () => void) => () => void;
}

/** The document as written. */
export type DocumentStore = Store<Record<string, unknown>>;

/** A store over the newest `value`: subscribers hear of a new value once it is committed. */
export function useStore<Value>(value: Value): Store<Value> {
  const current = useRef(value);
  current.current = value;
  const [store] = useState(() => {
    const listeners = new Set<() => void>();
    return {
      listeners,
      get: () => current.current,
      subscribe: (listener: () => void) => {
        listeners.add(listener);
        return () => listeners.delete(listener);
      },
    };
  });
  useLayoutEffect(() => {
    for (const listener of store.listeners) listener();
  }, [value, store]);
  return store;
}

export const SheetFieldsContext = createContext<SheetFields | null>(null);
export const DocumentStoreContext = createContext<DocumentStore | null>(null);
export const SheetReadingContext = createContext<Store<SheetReading> | null>(null);

function required<T>(value: T | null, what: string): T {
  if (!value) throw new Error(`${what} outside the sheet editor`);
  return value;
}

export function useSheetFields(): SheetFields {
  return required(useContext(SheetFieldsContext), 'useSheetFields');
}

/**
 * What `select` reads of the document; the caller re-renders only when that changes (compared with
 * Object.is, so select a value the document holds or a primitive, never a fresh object).
 */
export function useDocumentSelect<T>(select: (document: Record<string, unknown>) => T): T {
  const store = required(useContext(DocumentStoreContext), 'useDocumentSelect');
  const snapshot = () => select(store.get());
  // The server render reads the same document the island starts from.
  return useSyncExternalStore(store.subscribe, snapshot, snapshot);
}

/** The document's value at path; the caller re-renders when that value changes, not on every edit elsewhere. */
export function useDocumentAt(path: DocumentPath): unknown {
  return useDocumentSelect((document) => getAt(document, path));
}

/** The document as it is now, for event handlers that build a change from it (reading it does not subscribe). */
export function useCurrentDocument(): () => Record<string, unknown> {
  return required(useContext(DocumentStoreContext), 'useCurrentDocument').get;
}

function useSheetReading<T>(select: (reading: SheetReading) => T): T {
  const store = required(useContext(SheetReadingContext), 'useSheetReading');
  const snapshot = () => select(store.get());
  return useSyncExternalStore(store.subscribe, snapshot, snapshot);
}

/** The sheet reader's issue at path (for a vector, with the whole vector), re-rendering only when that issue changes. */
export function useIssueAt(path: DocumentPath): string | undefined {
  const at = pathText(path);
  return useSheetReading((reading) => reading.issues.get(at));
}

/** How the latest evaluation read the quantity at path text, re-rendering only when that reading changes. */
export function useReadingAt(at: string): FieldReading | undefined {
  return useSheetReading((reading) => reading.readings[at]);
}

/** What a quantity field at path shows beside its value: its path text, the evaluation's reading and the reader's issue. */
export function useQuantityFeedback(path: DocumentPath): { at: string; reading: FieldReading | undefined; issue: string | undefined } {
  const at = pathText(path);
  return { at, reading: useReadingAt(at), issue: useIssueAt(path) };
}
