import { SAFETY_CAUTION_TEXT } from '../../lib/safety';

/** The caution shown wherever joint rates can be copied or exported toward a controller. */
export function SafetyCaution() {
  return (
    <p role="note" className="border-l-4 border-ochre bg-paper-deep/60 px-3 py-2 text-xs text-ink" data-safety-caution>
      <strong>Caution:</strong> {SAFETY_CAUTION_TEXT}
    </p>
  );
}
