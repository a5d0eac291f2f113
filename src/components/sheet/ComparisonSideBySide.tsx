import { useMemo } from 'react';
import { formatValue, sideBySide, type Change, type MetricPair, type SideOfComparison, type StatisticsPair } from '../../lib/view/comparison-side-by-side';

const CHANGE_CLASS: Record<Change, string> = {
  same: '',
  better: 'bg-verdigris/15 font-semibold text-verdigris-deep',
  worse: 'bg-sienna/15 font-semibold text-sienna',
  'only-left': 'bg-paper-deep',
  'only-right': 'bg-paper-deep',
};

const CHANGE_WORD: Record<Change, string> = { same: '', better: 'better', worse: 'worse', 'only-left': 'left only', 'only-right': 'right only' };

const percent = (value: number | null) => (value === null ? '—' : `${(value * 100).toFixed(1)} %`);

function Cells({ metric, format }: { metric: MetricPair; format: (value: number | null) => string }) {
  const cls = CHANGE_CLASS[metric.change];
  const title = CHANGE_WORD[metric.change] || undefined;
  return (
    <>
      <td className={`num ${metric.change === 'same' ? '' : 'bg-paper-deep'}`}>{format(metric.left)}</td>
      <td className={`num ${cls}`} title={title} data-change={metric.change}>{format(metric.right)}</td>
    </>
  );
}

function PairTable({ caption, unit, rows, nameHeader }: { caption: string; unit: string; rows: StatisticsPair[]; nameHeader: string }) {
  return (
    <table className="w-full text-left text-xs">
      <caption className="text-left font-mono text-xs uppercase tracking-[0.2em]">{caption}</caption>
      <thead>
        <tr>
          <th rowSpan={2}>{nameHeader}</th>
          <th colSpan={2}>RMS ({unit})</th>
          <th colSpan={2}>Max ({unit})</th>
          <th colSpan={2}>Within tolerance</th>
        </tr>
        <tr className="text-graphite">
          <th>left</th><th>right</th><th>left</th><th>right</th><th>left</th><th>right</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((row) => (
          <tr key={row.name}>
            <td className="font-mono">{row.name}</td>
            <Cells metric={row.rms} format={formatValue} />
            <Cells metric={row.max} format={formatValue} />
            <Cells metric={row.within} format={percent} />
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const verdictWord = (within: boolean) => (within ? 'within tolerance' : 'outside tolerance');

/** Two comparisons of one log side by side (left: the older), per joint and per contact, differences highlighted: green where the right is better, red where worse. */
export default function ComparisonSideBySide({ left, right }: { left: SideOfComparison & { label: string }; right: SideOfComparison & { label: string } }) {
  const view = useMemo(() => sideBySide(left, right), [left, right]);
  return (
    <section aria-label="Comparisons side by side" className="mt-3 space-y-3 border-2 border-ink p-3" data-side-by-side>
      <h4 className="font-mono text-xs font-semibold uppercase tracking-[0.2em]">Side by side</h4>
      <table className="text-left text-sm">
        <tbody>
          <tr><th className="pr-3">Left</th><td>{left.label}</td><td className="pl-3">{verdictWord(view.left.withinTolerance)}</td></tr>
          <tr>
            <th className="pr-3">Right</th><td>{right.label}</td>
            <td className={`pl-3 ${CHANGE_CLASS[view.verdict]}`} data-change={view.verdict} data-side-verdict>{verdictWord(view.right.withinTolerance)}</td>
          </tr>
        </tbody>
      </table>
      <p className="text-xs text-graphite">Highlighted: the right differs as shown by more than a thousandth of the tolerance, green where better (smaller residual or slip, more within tolerance), red where worse.</p>
      <PairTable caption="Commanded rate residual, logged − sheet" unit="rad/s" nameHeader="Joint" rows={view.joints} />
      <PairTable caption="Slip at each contact" unit="mm/s" nameHeader="Finger" rows={view.contacts} />
    </section>
  );
}
