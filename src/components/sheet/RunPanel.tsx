import { memo, useMemo, useRef, type ReactNode } from 'react';
import LineChart, { type LineSeries, type ShadedStretch } from '../charts/LineChart';
import WarningStrip from '../charts/WarningStrip';
import { primaryButton } from '../form-parts';
import type { DisplayUnits } from '../../lib/sheet/display-units';
import { formatShownNumber, formatShownQuantity } from '../../lib/sheet/outputs';
import type { ExportSource } from '../../lib/sheet/run-export';
import type { SheetDocument } from '../../lib/sheet/types';
import { shownColumn } from '../../lib/view/chart-data';
import { SEVERITY_COLOURS } from '../../lib/view/palette';
import { describeStopReason, severityRuns, type JointSeries, type RunSeries } from '../../lib/view/series';
import ExportButtons from './ExportButtons';
import JobProgress from './JobProgress';
import { SafetyCaution } from './SafetyCaution';
import { RUN_JOBS, useWorkerJob } from './useWorkerJob';
import { SHORTCUTS, withShortcut } from '../../lib/view/shortcuts';
import { useShortcut } from './useShortcut';

const SEVERITY_NAMES = ['none', 'note', 'caution', 'singular'] as const;

function jointLines(columns: JointSeries[], siUnit: string, units: DisplayUnits): LineSeries[] {
  return columns.map((c) => ({ label: c.joint, values: shownColumn(c.values, siUnit, units).values }));
}

/** Chart inputs of a finished run in the sheet's display units, built once per run and choice. */
function runCharts(series: RunSeries, units: DisplayUnits) {
  const shaded: ShadedStretch[] = severityRuns(series.worstSeverity).map((r) => ({
    start: r.start,
    end: r.end,
    colour: SEVERITY_COLOURS[SEVERITY_NAMES[r.level] as 'note'],
  }));
  const metric = (key: string) => series.orientationError.find((m) => m.key === key)!;
  const angle = (key: string) => shownColumn(metric(key).values, metric(key).unit, units).values;
  return {
    shaded,
    angles: jointLines(series.jointAngles, 'rad', units),
    rates: jointLines(series.jointRates, 'rad/s', units),
    orientationAngles: [
      { label: `${metric('phi6').name} Φ6`, values: angle('phi6') },
      { label: `${metric('phi3').name} Φ3`, values: angle('phi3') },
    ],
    orientationRatios: ['phi2', 'phi4', 'phi5'].map((key, i) => ({ label: `${metric(key).name} Φ${[2, 4, 5][i]}`, values: metric(key).values })),
    position: [{ label: 'Position error', values: shownColumn(series.positionError, 'm', units).values }],
  };
}

/**
 * A run's outcome and plots. While the next run goes (`progress` given) they stay on screen, out of date, under the
 * progress: the click then repaints the status box alone, where taking the plots away repainted most of the page, and
 * the next run's results replace them in one commit. Out of date, they are no longer the panel's run-results.
 */
function RunResults({ series, stale, units, source, progress }: { series: RunSeries; stale: boolean; units: DisplayUnits; source: ExportSource; progress?: ReactNode }) {
  const outOfDate = progress !== undefined;
  return (
    <div className="space-y-4" data-testid={outOfDate ? 'run-results-out-of-date' : 'run-results'} aria-busy={outOfDate || undefined}>
      <div className="relative border-l-4 border-verdigris pl-3 text-sm" role="status">
        {outOfDate && (
          <div className="absolute inset-0 space-y-1 bg-paper">
            {progress}
            <p className="text-xs text-ochre">Running again: the plots below are from the previous run.</p>
          </div>
        )}
        <p data-testid="run-stop-reason">{describeStopReason(series.stopReason)}</p>
        <p className="text-xs" data-testid="run-solution">Joint rates followed: {series.followed}</p>
        <p className="text-xs text-graphite">
          <span className="num" data-testid="run-tick-count">{series.tickCount.toLocaleString('en')}</span> time steps of{' '}
          <span className="num">{series.settings.dt * 1000} ms</span> (<span className="num">{formatShownNumber(series.tickCount * series.settings.dt)} s</span>) computed in{' '}
          <span className="num" data-testid="run-elapsed" data-ms={series.elapsedMs.toFixed(2)}>
            {series.elapsedMs.toFixed(0)} ms
          </span>
          {stale && <span className="ml-2 text-ochre">The sheet has changed since this run; run again to update.</span>}
        </p>
      </div>
      <RunPlots series={series} units={units} source={source} />
    </div>
  );
}

/** The warnings, exports and plots of a run: memoised, so the progress drawn over out-of-date results renders none of them again. */
const RunPlots = memo(function RunPlots({ series, units, source }: { series: RunSeries; units: DisplayUnits; source: ExportSource }) {
  const charts = useMemo(() => runCharts(series, units), [series, units]);
  const common = { x: series.time, xLabel: 'time (s)', shaded: charts.shaded, syncKey: 'sheet-run' };
  return (
    <>
      <WarningStrip count={series.tickCount} worst={series.worstSeverity} warnings={series.warnings} axisLabel="time steps" />
      <SafetyCaution />
      <ExportButtons table={series.table} source={source} />
      <div className="grid gap-4 @3xl:grid-cols-2">
        <LineChart title="Joint angles" yLabel={units.angle} series={charts.angles} {...common} />
        <LineChart title={`Joint rates followed: ${series.followed}`} yLabel={units.angularSpeed} series={charts.rates} {...common} />
        <LineChart title="Orientation error (angles)" yLabel={units.angle} series={charts.orientationAngles} {...common} />
        <LineChart title="Orientation error (dimensionless metrics)" yLabel="1" series={charts.orientationRatios} {...common} />
        <LineChart title="Position error" yLabel={units.length} series={charts.position} {...common} />
      </div>
    </>
  );
});

/** Runs the sheet's closed loop toward motion.target in a worker and plots what happened over time, step by step. */
export default function RunPanel({ document, units, source }: { document: SheetDocument; units: DisplayUnits; source: ExportSource }) {
  const { state, start, cancel } = useWorkerJob(RUN_JOBS, { warmWith: { kind: 'run', document } });
  const ranWith = useRef<SheetDocument | null>(null);
  // Each run's results are a new element (keyed by the run's number), so nothing of the last run's stays in them.
  const runNumber = useRef(0);
  const previous = useRef<{ series: RunSeries; key: number; stale: boolean } | null>(null);
  const run = document.motion.run;
  const runButton = useRef<HTMLButtonElement>(null);
  useShortcut('run', () => runButton.current?.click());

  function startRun() {
    previous.current = state.status === 'done' ? { series: state.result, key: runNumber.current, stale: ranWith.current !== document } : null;
    runNumber.current++;
    ranWith.current = document;
    start({ kind: 'run', document });
  }

  const progress = <JobProgress state={state} unit="time steps" onCancel={cancel} />;
  const shownBefore = state.status === 'running' ? previous.current : null;

  return (
    <section className="@container space-y-4 border-2 border-ink bg-paper p-3" aria-label="Run toward the target pose" data-testid="run-panel">
      <div className="flex flex-wrap items-end gap-4">
        <div className="text-sm">
          <h3 className="font-semibold">Run toward the target pose</h3>
          <p className="text-xs text-graphite">
            gain <span className="num">{run.gain} 1/s</span> · time step <span className="num">{run.dt * 1000} ms</span> · at most{' '}
            <span className="num">{run.maxTicks.toLocaleString('en')}</span> steps (<span className="num">{formatShownNumber(run.maxTicks * run.dt)} s</span>) · tolerances{' '}
            <span className="num">{formatShownQuantity(run.positionTolerance, 'm', units)}</span>, <span className="num">{formatShownQuantity(run.angleTolerance, 'rad', units, 3)}</span>
            {run.stopOnSingular && ' · stops on singular warnings'}
            {run.noise && ' · with sensor noise'}
          </p>
        </div>
        <button
          ref={runButton}
          type="button"
          className={`${primaryButton} ml-auto`}
          onClick={startRun}
          disabled={state.status === 'running'}
          aria-keyshortcuts={SHORTCUTS.run.keys}
          title={withShortcut('Run toward the target pose', 'run')}
        >
          {state.status === 'done' || shownBefore ? 'Run again' : 'Run'}
        </button>
      </div>
      {!shownBefore && progress}
      {state.status === 'done' ? (
        <RunResults key={runNumber.current} series={state.result} stale={ranWith.current !== document} units={units} source={source} />
      ) : (
        shownBefore && <RunResults key={shownBefore.key} series={shownBefore.series} stale={shownBefore.stale} units={units} source={source} progress={progress} />
      )}
    </section>
  );
}
