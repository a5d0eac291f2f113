import { createContext, useContext, useSyncExternalStore } from 'react';
import type { DisplayUnits } from '../../lib/sheet/display-units';
import { getAt, type DocumentPath } from '../../lib/sheet/document-path';
import type { FieldReading } from '../../lib/sheet/readings';
import type { WarningNote } from '../../lib/sheet/warning-notes';

/** A warning beside the section whose inputs cause it, with its numbers. */
export type MarginWarning = WarningNote;

/** What a single field needs besides its own value: a way to change it and how the last evaluation read it. */
export interface SheetFields {
  update: (path: DocumentPath, value: unknown) => void;
  /** Issues of the sheet reader by path text ("hand.fingers[0].roller.radius"). */
  issues: ReadonlyMap<string, string>;
  /** How the latest evaluation read each quantity written as text, by path text. */
  readings: Readonly<Record<string, FieldReading>>;
  /** The sheet's display units, which field hints read values back in. */
  units: DisplayUnits;
  readOnly: boolean;
}

/** What every section of the editor needs: the document as written, a way to change it, and where it is wrong. */
export interface SheetEditing extends SheetFields {
  document: Record<string, unknown>;
}

/** The document as written, for fields that subscribe to their own value only. */
export interface DocumentStore {
  get: () => Record<string, unknown>;
  subscribe: (listener: () => void) => () => void;
}

export const SheetEditingContext = createContext<SheetEditing | null>(null);
/** Changes only with the issues, readings, units or access, never with a keystroke. */
export const SheetFieldsContext = createContext<SheetFields | null>(null);
export const DocumentStoreContext = createContext<DocumentStore | null>(null);

export function useSheetEditing(): SheetEditing {
  const editing = useContext(SheetEditingContext);
  if (!editing) throw new Error('useSheetEditing outside the sheet editor');
  return editing;
}

export function useSheetFields(): SheetFields {
  const fields = useContext(SheetFieldsContext);
  if (!fields) throw new Error('useSheetFields outside the sheet editor');
  return fields;
}

/** The document's value at path; the caller re-renders when that value changes, not on every edit elsewhere. */
export function useDocumentAt(path: DocumentPath): unknown {
  const store = useContext(DocumentStoreContext);
  if (!store) throw new Error('useDocumentAt outside the sheet editor');
  const snapshot = () => getAt(store.get(), path);
  // The server render reads the same document the island starts from.
  return useSyncExternalStore(store.subscribe, snapshot, snapshot);
}
