/**
 * The sheet editor's sections a worked example can point at: the anchor ids of SheetEditor.tsx's
 * PadSection elements, with the number and title the editor shows beside them.
 */
export const SHEET_SECTIONS = [
  { id: 'sheet-summary', number: 0, title: 'Sheet' },
  { id: 'object', number: 1, title: 'Object' },
  { id: 'hand', number: 2, title: 'Hand' },
  { id: 'motion', number: 3, title: 'Motion' },
  { id: 'variables', number: 4, title: 'Variables' },
  { id: 'results', number: 5, title: 'Results' },
  { id: 'derivation', number: 6, title: 'Derivation' },
  { id: 'notes', number: 7, title: 'Notes' },
] as const;

export type SheetSectionId = (typeof SHEET_SECTIONS)[number]['id'];

export const SHEET_SECTION_IDS = SHEET_SECTIONS.map((s) => s.id) as [SheetSectionId, ...SheetSectionId[]];
