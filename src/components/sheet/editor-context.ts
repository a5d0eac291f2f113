import { createContext, useContext } from 'react';
import type { DisplayUnits } from '../../lib/sheet/display-units';
import type { DocumentPath } from '../../lib/sheet/document-path';
import type { FieldReading } from '../../lib/sheet/readings';
import type { WarningNote } from '../../lib/sheet/warning-notes';

/** A warning beside the section whose inputs cause it, with its numbers. */
export type MarginWarning = WarningNote;

/** What every section of the editor needs: the document as written, a way to change it, and where it is wrong. */
export interface SheetEditing {
  document: Record<string, unknown>;
  update: (path: DocumentPath, value: unknown) => void;
  /** Issues of the sheet reader by path text ("hand.fingers[0].roller.radius"). */
  issues: ReadonlyMap<string, string>;
  /** How the latest evaluation read each quantity written as text, by path text. */
  readings: Readonly<Record<string, FieldReading>>;
  /** The sheet's display units, which field hints read values back in. */
  units: DisplayUnits;
  readOnly: boolean;
}

export const SheetEditingContext = createContext<SheetEditing | null>(null);

export function useSheetEditing(): SheetEditing {
  const editing = useContext(SheetEditingContext);
  if (!editing) throw new Error('useSheetEditing outside the sheet editor');
  return editing;
}
