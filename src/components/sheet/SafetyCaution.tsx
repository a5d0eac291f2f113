/** The caution shown wherever joint rates can be copied or exported toward a controller. */
export function SafetyCaution() {
  return (
    <p role="note" className="border-l-4 border-ochre bg-paper-deep/60 px-3 py-2 text-xs text-ink" data-safety-caution>
      <strong>Caution:</strong> computed joint rates are not safety-rated. Check joint and rate limits, keep an emergency stop within
      reach, and follow the applicable machine-safety standards and local practice.
    </p>
  );
}
