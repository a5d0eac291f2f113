/** Class names of the sheet pad, so every section of the editor looks alike. */
export const fieldInput =
  'w-full border border-rule bg-paper px-2 py-1 font-mono text-sm tabular-nums focus:outline-none focus:border-verdigris aria-[invalid=true]:border-sienna disabled:bg-paper-deep/40 disabled:text-graphite';
export const smallLabel = 'block text-[11px] uppercase tracking-wide text-graphite';
export const sectionHeading = 'text-sm font-semibold uppercase tracking-[0.12em] text-ink';
export const button = 'border-2 border-ink px-3 py-1 text-sm font-semibold hover:bg-paper-deep disabled:opacity-60';
export const primaryButton = 'bg-ink text-paper px-4 py-1.5 text-sm font-semibold hover:bg-verdigris-deep disabled:opacity-60';
export const selectInput = 'border border-rule bg-paper px-2 py-1 text-sm focus:outline-none focus:border-verdigris disabled:text-graphite';

/** Colours of the warning severities (note, caution, singular) from the palette. */
export const SEVERITY_CLASS: Record<'note' | 'caution' | 'singular', string> = {
  note: 'border-note text-note',
  caution: 'border-ochre text-ochre',
  singular: 'border-sienna text-sienna',
};
