import { useId, useMemo, useState } from 'react';
import LineChart, { type LineSeries } from '../charts/LineChart';
import { SeverityKey } from '../charts/WarningStrip';
import { button } from './sheet-styles';
import type { LogComparison } from '../../lib/logs/compare';
import { SOLUTION_NAMES } from '../../lib/sheet/commanded';
import { DEFAULT_COMMANDED } from '../../lib/sheet/sheet-constants';
import { jointPlots, seriesBounds, slipPlot, warningBands, type ComparisonPlot } from '../../lib/view/comparison-plots';
import { formatValue } from '../../lib/view/comparison-side-by-side';
import { PALETTE, SEVERITY_COLOURS } from '../../lib/view/palette';
import { showsAll, type XRange } from '../../lib/view/zoom';
import { revisionLabel } from '../../lib/view/revision';

/** One comparison's verdict, per-joint and per-contact statistics and charts; `revision` is the sheet revision it judged against. */
export default function ComparisonResultView({ result, revision }: { result: LogComparison; revision: number }) {
  const within = result.verdict.withinTolerance;
  return (
    <div className="mt-4 space-y-4" data-comparison-result>
      <div className={`border-l-4 px-3 py-2 ${within ? 'border-verdigris' : 'border-sienna'}`} data-verdict={within ? 'pass' : 'fail'}>
        <p className="font-semibold">{within ? 'Within tolerance' : 'Outside tolerance'} · {revisionLabel(revision)} · {result.samples} samples</p>
        <ul className="mt-1 list-disc pl-5 text-sm">
          {result.verdict.reasons.map((reason) => (
            <li key={reason}>{reason}</li>
          ))}
        </ul>
      </div>
      <table className="w-full text-left text-xs" data-joint-table>
        <caption className="text-left font-mono text-xs uppercase tracking-[0.2em]">Commanded rate, logged − sheet (rad/s)</caption>
        <thead>
          <tr><th>Joint</th><th>RMS</th><th>Max</th><th>Max at (s)</th><th>Within</th></tr>
        </thead>
        <tbody>
          {result.joints.map((j) => (
            <tr key={j.joint} className={j.withinFraction < 1 ? 'text-sienna' : ''}>
              <td className="font-mono">{j.joint}</td><td className="num">{formatValue(j.rms)}</td><td className="num">{formatValue(j.max)}</td>
              <td className="num">{formatValue(j.maxAt)}</td><td className="num">{(j.withinFraction * 100).toFixed(1)} %</td>
            </tr>
          ))}
        </tbody>
      </table>
      <table className="w-full text-left text-xs" data-contact-table>
        <caption className="text-left font-mono text-xs uppercase tracking-[0.2em]">Slip at each contact (mm/s)</caption>
        <thead>
          <tr><th>Finger</th><th>RMS</th><th>Max</th><th>Max at (s)</th><th>Within</th></tr>
        </thead>
        <tbody>
          {result.contacts.map((c) => (
            <tr key={c.finger}>
              <td className="font-mono">{c.finger}</td>
              {c.computed ? (
                <>
                  <td className="num">{formatValue(c.rms * 1000)}</td><td className="num">{formatValue(c.max * 1000)}</td>
                  <td className="num">{formatValue(c.maxAt)}</td><td className="num">{(c.withinFraction * 100).toFixed(1)} %</td>
                </>
              ) : (
                <td colSpan={4} className="text-graphite">{c.reason}</td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <ComparisonCharts result={result} />
    </div>
  );
}

const TOLERANCE_STYLE = { stroke: PALETTE.graphite, dash: [5, 4], width: 1 };

/** The chart's series: data lines in the palette's turn (wide under a reference line), the reference thin on top, tolerance lines thin and dashed. */
function chartSeries(plot: ComparisonPlot): LineSeries[] {
  const underReference = plot.lines.some((line) => line.role === 'reference');
  return plot.lines.map((line) => {
    const drawn = { label: line.label, values: line.values };
    if (line.role === 'tolerance') return { ...drawn, ...TOLERANCE_STYLE };
    if (line.role === 'reference') return { ...drawn, width: 1.25 };
    return underReference ? { ...drawn, width: 3 } : drawn;
  });
}

/**
 * Per joint the logged and sheet commanded rates beside the residual with its tolerance, then the
 * slip per contact; warning bands shaded by severity behind every plot. Zooming or panning any
 * plot moves all of them, so one moment can be read across joints and contacts.
 */
function ComparisonCharts({ result }: { result: LogComparison }) {
  const syncKey = useId();
  const [xRange, setXRange] = useState<XRange | null>(null);
  const charts = useMemo(() => {
    const bands = warningBands(result.series).map((band) => ({ ...band, colour: SEVERITY_COLOURS[band.severity] }));
    const joints = jointPlots(result).map((j) => ({ joint: j.joint, rates: { plot: j.rates, series: chartSeries(j.rates) }, residual: { plot: j.residual, series: chartSeries(j.residual) } }));
    const slip = slipPlot(result);
    return { bands, joints, slip: slip && { plot: slip, series: chartSeries(slip) }, bounds: seriesBounds(result.series) };
  }, [result]);
  const zoomed = !showsAll(xRange, charts.bounds ?? { min: 0, max: 0 });
  const chart = ({ plot, series }: { plot: ComparisonPlot; series: LineSeries[] }) => (
    <LineChart
      key={plot.key} title={plot.title} x={plot.x} xLabel="s" yLabel={plot.yLabel} series={series} height={180}
      bands={charts.bands} syncKey={syncKey} xRange={xRange} onXRangeChange={setXRange}
    />
  );
  return (
    <div className="space-y-3" data-comparison-charts data-x-range={xRange ? `${xRange.min} ${xRange.max}` : 'all'}>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-xs text-graphite">
        <span data-comparison-solution>
          Sheet rates: what the sheet would command under {SOLUTION_NAMES[result.solution ?? DEFAULT_COMMANDED]}
          {result.solution === undefined && ' (compared before the sheet named its commanded solution)'}.
        </span>
        <span>Wheel zooms, drag selects a stretch, Shift-drag pans; every plot follows.</span>
        <button type="button" className={button} disabled={!zoomed} onClick={() => setXRange(null)} data-reset-zoom>
          Reset zoom
        </button>
        {charts.bands.length > 0 && (
          <span className="flex items-center gap-3" data-warning-bands={charts.bands.length}>
            Shaded: worst warning raised
            <SeverityKey faded />
          </span>
        )}
      </div>
      {charts.joints.map((j) => (
        <div key={j.joint} className="grid gap-3 md:grid-cols-2" data-joint-plots={j.joint}>
          {chart(j.rates)}
          {chart(j.residual)}
        </div>
      ))}
      {charts.slip && <div data-slip-plot>{chart(charts.slip)}</div>}
    </div>
  );
}
