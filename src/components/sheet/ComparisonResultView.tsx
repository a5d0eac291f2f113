import { useMemo } from 'react';
import LineChart from '../charts/LineChart';
import type { LogComparison } from '../../lib/logs/compare';

const digits = (value: number | null) => (value === null || !Number.isFinite(value) ? '—' : Number(value.toPrecision(4)).toString());

/** Per series of the decimated plot data: x and y with each bucket's smallest and largest value, so spikes survive decimation. */
function envelope(series: LogComparison['series'], label: string): { x: number[]; y: number[] } | null {
  const s = series.labels.indexOf(label);
  if (s < 0) return null;
  const x: number[] = [], y: number[] = [];
  series.from.forEach((from, b) => {
    x.push(from, series.to[b]!);
    y.push(series.min[s]![b]!, series.max[s]![b]!);
  });
  return { x, y };
}

/** One comparison's verdict, per-joint and per-contact statistics and charts; `revision` is the sheet revision it judged against. */
export default function ComparisonResultView({ result, revision }: { result: LogComparison; revision: number }) {
  const within = result.verdict.withinTolerance;
  return (
    <div className="mt-4 space-y-4" data-comparison-result>
      <div className={`border-l-4 px-3 py-2 ${within ? 'border-verdigris' : 'border-sienna'}`} data-verdict={within ? 'pass' : 'fail'}>
        <p className="font-semibold">{within ? 'Within tolerance' : 'Outside tolerance'} · revision {revision} · {result.samples} samples</p>
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
              <td className="font-mono">{j.joint}</td><td className="num">{digits(j.rms)}</td><td className="num">{digits(j.max)}</td>
              <td className="num">{digits(j.maxAt)}</td><td className="num">{(j.withinFraction * 100).toFixed(1)} %</td>
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
                  <td className="num">{digits(c.rms * 1000)}</td><td className="num">{digits(c.max * 1000)}</td>
                  <td className="num">{digits(c.maxAt)}</td><td className="num">{(c.withinFraction * 100).toFixed(1)} %</td>
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

function ComparisonCharts({ result }: { result: LogComparison }) {
  const charts = useMemo(() => {
    const joints = result.joints.flatMap((j) => {
      const logged = envelope(result.series, `${j.joint} logged`);
      const sheet = envelope(result.series, `${j.joint} sheet`);
      return logged && sheet ? [{ joint: j.joint, x: logged.x, series: [{ label: 'logged', values: logged.y }, { label: 'sheet', values: sheet.y }] }] : [];
    });
    const slips = result.contacts.filter((c) => c.computed).flatMap((c) => {
      const slip = envelope(result.series, `${c.finger} slip`);
      return slip ? [{ label: c.finger, x: slip.x, values: slip.y.map((v) => v * 1000) }] : [];
    });
    return { joints, slips };
  }, [result]);
  return (
    <div className="grid gap-4" data-comparison-charts>
      {charts.joints.map((chart) => (
        <LineChart key={chart.joint} title={`${chart.joint}: commanded rate`} x={chart.x} xLabel="s" yLabel="rad/s" series={chart.series} syncKey="log-comparison" />
      ))}
      {charts.slips.length > 0 && (
        <LineChart title="Slip per contact" x={charts.slips[0]!.x} xLabel="s" yLabel="mm/s" series={charts.slips.map(({ label, values }) => ({ label, values }))} syncKey="log-comparison" />
      )}
    </div>
  );
}

