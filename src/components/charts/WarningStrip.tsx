import { useEffect, useMemo, useRef } from 'react';
import { severityRuns } from '../../lib/view/series';
import { SEVERITY_COLOURS } from '../../lib/view/palette';
import type { WarningOccurrence } from '../../lib/view/series';

const LEVELS = ['none', 'note', 'caution', 'singular'] as const;
const LABEL_WIDTH = 160;

interface Stretch {
  start: number;
  end: number;
  colour: string;
}

/** Consecutive indices gathered into [start, end) stretches. */
function stretchesOf(indices: ArrayLike<number>): { start: number; end: number }[] {
  const stretches: { start: number; end: number }[] = [];
  for (let k = 0; k < indices.length; k++) {
    const i = indices[k]!;
    const last = stretches[stretches.length - 1];
    if (last && last.end === i) last.end = i + 1;
    else stretches.push({ start: i, end: i + 1 });
  }
  return stretches;
}

/**
 * One row of the strip: the stretches over `count` indices, drawn across the row's width. A canvas, drawn when the
 * browser lays the row out (its resize observer): a long noisy run raises thousands of stretches, which as SVG
 * elements took the page hundreds of milliseconds to create and lay out.
 */
function StripRow({ count, stretches, label }: { count: number; stretches: Stretch[]; label: string }) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas) return;
    const observer = new ResizeObserver(([entry]) => {
      const width = Math.round((entry?.contentRect.width ?? 0) * devicePixelRatio);
      const context = canvas.getContext('2d');
      if (width === 0 || !context) return;
      // One pixel high, stretched to the row's height: every stretch spans the row.
      canvas.width = width;
      canvas.height = 1;
      const scale = width / count;
      for (const stretch of stretches) {
        context.fillStyle = stretch.colour;
        context.fillRect(stretch.start * scale, 0, (stretch.end - stretch.start) * scale, 1);
      }
    });
    observer.observe(canvas);
    return () => observer.disconnect();
  }, [count, stretches]);
  return <canvas ref={canvasRef} className="block h-3.5 min-w-0 flex-1 bg-paper-deep" role="img" aria-label={`${label}: ${stretches.length} stretch(es)`} />;
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
  // Built once per outcome, so a rendering of the panel for another reason does not draw the rows again.
  const rows = useMemo(
    () => [
      { label: 'Worst severity', stretches: severityRuns(worst).map((r): Stretch => ({ ...r, colour: SEVERITY_COLOURS[LEVELS[r.level] as 'note'] })) },
      ...warnings.map((w) => ({ label: w.title, stretches: stretchesOf(w.indices).map((s): Stretch => ({ ...s, colour: SEVERITY_COLOURS[w.severity] })) })),
    ],
    [worst, warnings],
  );
  if (count === 0) return null;
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
            <StripRow count={count} stretches={row.stretches} label={row.label} />
          </div>
        ))}
      </div>
      <div className="mt-1 flex gap-4 text-xs text-graphite">
        <SeverityKey />
      </div>
    </figure>
  );
}
