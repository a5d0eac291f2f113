/** Class names of the sheet pad, so every section of the editor looks alike. */
// The classes a sheet repeats hundreds of times are defined once in styles/global.css: spelled out as utilities they made up a fifth of the sheet page's HTML.
export const fieldInput = 'field-input';
export const smallLabel = 'small-label';
export const sectionHeading = 'text-sm font-semibold uppercase tracking-[0.12em] text-ink';
export const button = 'border-2 border-ink px-3 py-1 text-sm font-semibold hover:bg-paper-deep disabled:opacity-60';
export const primaryButton = 'bg-ink text-paper px-4 py-1.5 text-sm font-semibold hover:bg-verdigris-deep disabled:opacity-60';
export const selectInput = 'select-input';
export const fieldReading = 'field-reading';
export const readingBare = 'reading-bare';
export const resultRow = 'result-row';
export const resultLabel = 'result-label';
export const resultValue = 'result-value';
export const resultUnit = 'result-unit';

/** Colours of the warning severities (note, caution, singular) from the palette. */
export const SEVERITY_CLASS: Record<'note' | 'caution' | 'singular', string> = {
  note: 'border-note text-note',
  caution: 'border-ochre text-ochre',
  singular: 'border-sienna text-sienna',
};
