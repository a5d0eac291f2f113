import { warningBadgeText, type WorstSeverity } from '../../lib/sheet/summary';

const STYLES: Record<WorstSeverity, string> = {
  none: 'border-verdigris text-verdigris-deep',
  note: 'border-note text-note',
  caution: 'border-ochre bg-ochre/10 text-ochre',
  singular: 'border-sienna bg-sienna text-paper',
};

/**
 * The worst warning severity of a revision and the number of raised warnings as a coloured badge (warningBadgeText);
 * the distinct codes go into its tooltip.
 */
export default function WarningBadge({ worst, count, codes = [] }: { worst: WorstSeverity | null | undefined; count: number | null | undefined; codes?: readonly string[] }) {
  if (!worst) return <span className="text-xs text-graphite">not computed</span>;
  const badge = warningBadgeText(worst, count);
  return (
    <span
      className={`inline-block border-2 px-1.5 py-px text-[11px] font-semibold uppercase tracking-wider num ${STYLES[worst]}`}
      title={codes.length ? `${badge.count ?? 'some'} warning${badge.count === 1 ? '' : 's'}: ${codes.join(', ')}` : 'no warnings'}
      data-worst={worst}
      data-warning-count={badge.count ?? undefined}
    >
      {badge.label}
      {badge.count !== null && <span className="ml-1 font-normal">{badge.count}</span>}
    </span>
  );
}
