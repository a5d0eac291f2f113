import { SAFETY_CAUTION_TEXT } from '../../lib/safety';

/**
 * The caution shown wherever joint rates are shown, copied or exported toward a controller. Labelled "Safety" on an ink
 * tag inside an ink frame, so it never reads as a warning of severity "caution" (ochre).
 */
export function SafetyCaution({ testId }: { testId?: string }) {
  return (
    <aside role="note" aria-label="Safety" className="flex items-baseline gap-2 border-2 border-ink bg-paper px-3 py-2 text-xs text-ink" data-safety-caution data-testid={testId}>
      <span className="shrink-0 bg-ink px-1.5 py-px text-[10px] font-bold uppercase tracking-widest text-paper" data-safety-label>
        Safety
      </span>
      <span>{SAFETY_CAUTION_TEXT}</span>
    </aside>
  );
}
