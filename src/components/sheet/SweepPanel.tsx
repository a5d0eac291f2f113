import { useMemo, useRef, useState } from 'react';
import LineChart, { type LineSeries, type ShadedStretch } from '../charts/LineChart';
import WarningStrip from '../charts/WarningStrip';
import { inputClass, labelClass, primaryButton } from '../form-parts';
import type { DisplayUnits } from '../../lib/sheet/display-units';
import type { ExportSource } from '../../lib/sheet/run-export';
import type { SheetDocument } from '../../lib/sheet/types';
import { shownColumn } from '../../lib/view/chart-data';
import { SEVERITY_COLOURS } from '../../lib/view/palette';
import { severityRuns, type SweepSeries } from '../../lib/view/series';
import { DEFAULT_SWEEP_STEPS, sweepInputs, sweepSettingsFrom, type DisplayUnit, type SweepInput } from '../../lib/view/sweep-inputs';
import ExportButtons from './ExportButtons';
import JobProgress from './JobProgress';
import { SafetyCaution } from './SafetyCaution';
import { SWEEP_JOBS, useWorkerJob } from './useWorkerJob';
import { SHORTCUTS, withShortcut } from '../../lib/view/shortcuts';
import { useShortcut } from './useShortcut';

const SEVERITY_NAMES = ['none', 'note', 'caution', 'singular'] as const;
const MAX_STEPS = 1000;

/** A value for an input box: enough digits to round-trip what a person would type. */
const shown = (value: number) => String(Number(value.toPrecision(6)));

/** " (unit)" after a label, nothing for a number without unit. */
const inUnit = (unit: DisplayUnit) => (unit.symbol === '' ? '' : ` (${unit.symbol})`);

/** Chart inputs of a finished sweep: x in the swept input's display unit, the outputs in the sheet's display units. */
function sweepCharts(series: SweepSeries, unit: DisplayUnit, units: DisplayUnits) {
  const x = series.values.map((v) => v * unit.factor);
  const shaded: ShadedStretch[] = severityRuns(series.worstSeverity).map((r) => ({
    start: r.start,
    end: r.end,
    colour: SEVERITY_COLOURS[SEVERITY_NAMES[r.level] as 'note'],
  }));
  const perFinger = (pick: (f: SweepSeries['fingers'][number]) => Float64Array, siUnit = '1'): LineSeries[] =>
    series.fingers.map((f) => ({ label: f.finger, values: shownColumn(pick(f), siUnit, units).values }));
  return {
    x,
    shaded,
    rates: series.fingers.flatMap((f) => f.rates.map((r) => ({ label: r.joint, values: shownColumn(r.values, 'rad/s', units).values }))),
    rankRatio: perFinger((f) => f.rankRatio),
    residual: perFinger((f) => f.residual, 'm/s'),
    gap: perFinger((f) => f.gap, 'm'),
  };
}

function SweepResults({ series, input, units, source }: { series: SweepSeries; input: SweepInput; units: DisplayUnits; source: ExportSource }) {
  const charts = useMemo(() => sweepCharts(series, input.unit, units), [series, input.unit, units]);
  const xLabel = `${input.label}${inUnit(input.unit)}`;
  const common = { x: charts.x, xLabel, shaded: charts.shaded, syncKey: 'sheet-sweep' };
  return (
    <div className="space-y-4" data-testid="sweep-results">
      <p className="text-xs text-graphite" role="status">
        <span className="num">{series.values.length}</span> values of <span className="num">{series.path}</span> solved in{' '}
        <span className="num">{series.elapsedMs.toFixed(0)} ms</span>. Shading marks the worst warning at each value.
      </p>
      <p className="text-xs" data-testid="sweep-solution">Joint rates plotted: {series.followed}</p>
      <WarningStrip count={series.values.length} worst={series.worstSeverity} warnings={series.warnings} axisLabel="the swept values" />
      <SafetyCaution />
      <ExportButtons table={series.table} source={source} />
      <div className="grid gap-4 @3xl:grid-cols-2">
        <LineChart title={`Commanded joint rates: ${series.followed}`} yLabel={units.angularSpeed} series={charts.rates} {...common} />
        <LineChart title="Rank-loss ratio the warning judges (drive columns after steering)" yLabel="σmin/σmax" logY series={charts.rankRatio} {...common} />
        <LineChart title={`Slip speed left: ${series.followed}`} yLabel={`${units.length}/s`} series={charts.residual} {...common} />
        <LineChart title="Contact gap" yLabel={units.length} series={charts.gap} {...common} />
      </div>
    </div>
  );
}

/** Sweeps one numeric input of the sheet over a range in a worker and plots the outputs over it. */
export default function SweepPanel({ document, units, source }: { document: SheetDocument; units: DisplayUnits; source: ExportSource }) {
  const inputs = useMemo(() => sweepInputs(document, units), [document, units]);
  const [path, setPath] = useState(() => inputs[0]?.path ?? '');
  const input = inputs.find((i) => i.path === path) ?? inputs[0]!;
  const [typed, setRange] = useState(() => ({ from: shown(input.from * input.unit.factor), to: shown(input.to * input.unit.factor), factor: input.unit.factor }));
  // The typed range follows a change of the sheet's display units: a number is carried over to the new unit.
  const carried = (text: string) => (text.trim() !== '' && Number.isFinite(Number(text)) ? shown((Number(text) / typed.factor) * input.unit.factor) : text);
  const range = typed.factor === input.unit.factor ? typed : { from: carried(typed.from), to: carried(typed.to), factor: input.unit.factor };
  const [steps, setSteps] = useState(String(document.sweep?.steps ?? DEFAULT_SWEEP_STEPS));
  const [error, setError] = useState<string | null>(null);
  const [sweptInput, setSweptInput] = useState<SweepInput | null>(null);
  const { state, start, cancel } = useWorkerJob(SWEEP_JOBS);
  const sweepButton = useRef<HTMLButtonElement>(null);
  useShortcut('sweep', () => sweepButton.current?.click());

  function choose(nextPath: string) {
    const next = inputs.find((i) => i.path === nextPath)!;
    setPath(nextPath);
    setRange({ from: shown(next.from * next.unit.factor), to: shown(next.to * next.unit.factor), factor: next.unit.factor });
  }

  function submit() {
    const from = Number(range.from), to = Number(range.to), count = Number(steps);
    if (!Number.isFinite(from) || !Number.isFinite(to) || range.from.trim() === '' || range.to.trim() === '') {
      setError('Give the range as two numbers in the unit shown.');
      return;
    }
    if (!Number.isInteger(count) || count < 2 || count > MAX_STEPS) {
      setError(`Steps must be a whole number from 2 to ${MAX_STEPS}.`);
      return;
    }
    setError(null);
    setSweptInput(input);
    start({ kind: 'sweep', document, settings: sweepSettingsFrom(input, from, to, count) });
  }

  return (
    <section className="@container space-y-4 border-2 border-ink bg-paper p-3" aria-label="Sweep one input" data-testid="sweep-panel">
      <h3 className="text-sm font-semibold">Sweep one input</h3>
      <form
        onSubmit={(event) => {
          event.preventDefault();
          submit();
        }}
        noValidate
        className="grid grid-cols-3 items-end gap-3 @2xl:grid-cols-[3fr_1fr_1fr_1fr_auto]">
        <label className={`${labelClass} col-span-3 @2xl:col-span-1`}>
          Input to sweep
          <select className={inputClass} value={input.path} onChange={(e) => choose(e.target.value)} name="sweepPath">
            {inputs.map((i) => (
              <option key={i.path} value={i.path}>
                {i.label} — now {shown(i.value * i.unit.factor)}{i.unit.symbol === '' ? '' : ` ${i.unit.symbol}`}
              </option>
            ))}
          </select>
        </label>
        <label className={labelClass}>
          From{inUnit(input.unit)}
          <input className={inputClass} name="sweepFrom" inputMode="decimal" value={range.from} onChange={(e) => setRange({ ...range, from: e.target.value })} />
        </label>
        <label className={labelClass}>
          To{inUnit(input.unit)}
          <input className={inputClass} name="sweepTo" inputMode="decimal" value={range.to} onChange={(e) => setRange({ ...range, to: e.target.value })} />
        </label>
        <label className={labelClass}>
          Steps
          <input className={inputClass} name="sweepSteps" inputMode="numeric" value={steps} onChange={(e) => setSteps(e.target.value)} />
        </label>
        <button
          ref={sweepButton}
          className={`${primaryButton} col-span-3 @2xl:col-span-1`}
          disabled={state.status === 'running'}
          aria-keyshortcuts={SHORTCUTS.sweep.keys}
          title={withShortcut('Sweep the input over the range', 'sweep')}
        >
          Sweep
        </button>
      </form>
      {error && (
        <p className="border-l-4 border-sienna pl-3 text-sm text-sienna" role="alert">
          {error}
        </p>
      )}
      <JobProgress state={state} unit="values" onCancel={cancel} />
      {state.status === 'done' && sweptInput && (
        <SweepResults series={state.result} input={inputs.find((i) => i.path === sweptInput.path) ?? sweptInput} units={units} source={source} />
      )}
    </section>
  );
}
