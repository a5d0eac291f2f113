import { severityRuns } from '../../lib/view/series';
import { SEVERITY_COLOURS } from '../../lib/view/palette';
import type { WarningOccurrence } from '../../lib/view/series';

const LEVELS = ['none', 'note', 'caution', 'singular'] as const;
const ROW_HEIGHT = 14;
const LABEL_WIDTH = 160;

/** Consecutive indices gathered into [start, end) stretches. */
function stretchesOf(indices: number[]): { start: number; end: number }[] {
  const stretches: { start: number; end: number }[] = [];
  for (const i of indices) {
    const last = stretches[stretches.length - 1];
    if (last && last.end === i) last.end = i + 1;
    else stretches.push({ start: i, end: i + 1 });
  }
  return stretches;
}

/** A swatch per warning severity; `faded` matches the light shading drawn behind plot lines. */
export function SeverityKey({ faded = false }: { faded?: boolean }) {
  return (
    <>
      {(['note', 'caution', 'singular'] as const).map((level) => (
        <span key={level} className="flex items-center gap-1">
          <span className={`inline-block h-2.5 w-2.5 ${faded ? 'opacity-40' : ''}`} style={{ background: SEVERITY_COLOURS[level] }} /> {level}
        </span>
      ))}
    </>
  );
}

/**
 * Where warnings were raised along a run (ticks) or a sweep (steps): the worst severity per index
 * on the first row, then one row per warning code, coloured by severity.
 */
export default function WarningStrip({ count, worst, warnings, axisLabel }: {
  count: number;
  worst: ArrayLike<number>;
  warnings: WarningOccurrence[];
  axisLabel: string;
}) {
  if (count === 0) return null;
  const rows = [
    { label: 'Worst severity', stretches: severityRuns(worst).map((r) => ({ ...r, colour: SEVERITY_COLOURS[LEVELS[r.level] as 'note'] })) },
    ...warnings.map((w) => ({ label: w.title, stretches: stretchesOf(w.indices).map((s) => ({ ...s, colour: SEVERITY_COLOURS[w.severity] })) })),
  ];
  return (
    <figure className="border border-rule bg-paper p-2" data-testid="warning-strip">
      <figcaption className="mb-1 text-xs font-semibold text-graphite">
        Warnings over {axisLabel} {warnings.length === 0 && <span className="font-normal">— none raised</span>}
      </figcaption>
      <div className="space-y-0.5">
        {rows.map((row) => (
          <div key={row.label} className="flex items-center gap-2">
            <span className="shrink-0 truncate text-xs text-graphite" style={{ width: LABEL_WIDTH }} title={row.label}>
              {row.label}
            </span>
            <svg
              className="block h-3.5 min-w-0 flex-1 bg-paper-deep"
              viewBox={`0 0 ${count} ${ROW_HEIGHT}`}
              preserveAspectRatio="none"
              role="img"
              aria-label={`${row.label}: ${row.stretches.length} stretch(es)`}
            >
              {row.stretches.map((s) => (
                <rect key={s.start} x={s.start} y={0} width={s.end - s.start} height={ROW_HEIGHT} fill={s.colour} />
              ))}
            </svg>
          </div>
        ))}
      </div>
      <div className="mt-1 flex gap-4 text-xs text-graphite">
        <SeverityKey />
      </div>
    </figure>
  );
}
