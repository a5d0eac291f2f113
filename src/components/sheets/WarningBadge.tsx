import type { WorstSeverity } from '../../lib/sheet/summary';

const STYLES: Record<WorstSeverity, { label: string; className: string }> = {
  none: { label: 'clean', className: 'border-verdigris text-verdigris-deep' },
  note: { label: 'note', className: 'border-note text-note' },
  caution: { label: 'caution', className: 'border-ochre bg-ochre/10 text-ochre' },
  singular: { label: 'singular', className: 'border-sienna bg-sienna text-paper' },
};

/** The worst warning severity of a revision as a coloured badge; the codes go into its tooltip. */
export default function WarningBadge({ worst, codes = [] }: { worst: WorstSeverity | null | undefined; codes?: readonly string[] }) {
  if (!worst) return <span className="text-xs text-graphite">not computed</span>;
  const style = STYLES[worst];
  return (
    <span
      className={`inline-block border-2 px-1.5 py-px text-[11px] font-semibold uppercase tracking-wider num ${style.className}`}
      title={codes.length ? codes.join(', ') : 'no warnings'}
      data-worst={worst}
    >
      {style.label}
      {codes.length > 0 && <span className="ml-1 font-normal">{codes.length}</span>}
    </span>
  );
}
