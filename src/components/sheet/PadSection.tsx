import type { ReactNode } from 'react';
import { warningHelpHref } from '../../lib/docs/reference';
import type { MarginWarning } from './editor-context';
import { SEVERITY_CLASS, sectionHeading } from './sheet-styles';

/** One section of the pad with its margin: the warnings this section causes sit beside it. */
export default function PadSection({
  id,
  number,
  title,
  warnings = [],
  children,
}: {
  id: string;
  number: number;
  title: string;
  warnings?: MarginWarning[];
  children: ReactNode;
}) {
  return (
    <section id={id} aria-labelledby={`${id}-title`} className="grid gap-x-5 border-b border-rule py-5 lg:grid-cols-[minmax(0,1fr)_13rem]">
      <div className="min-w-0">
        <h2 id={`${id}-title`} className={`${sectionHeading} mb-3 flex items-baseline gap-3`}>
          <span className="num text-graphite">{number}.</span>
          {title}
        </h2>
        {children}
      </div>
      <aside aria-label={`Margin notes: ${title}`} className="mt-3 space-y-2 lg:mt-8" data-margin={id}>
        {warnings.map((w, index) => (
          <div key={`${w.code}-${index}`} className={`border-l-4 bg-paper-deep/60 px-2 py-1 text-xs ${SEVERITY_CLASS[w.severity]}`} data-warning={w.code} role="note">
            <span className="block font-semibold uppercase tracking-wide text-[10px]">{w.severity}</span>
            <span className="block font-semibold text-ink">{w.title}</span>
            <span className="block text-ink" data-warning-where>{w.where}</span>
            <dl className="my-0.5 grid grid-cols-[auto_1fr] gap-x-2 text-ink">
              <dt className="text-graphite" title={w.valueMeaning}>value</dt>
              <dd className="num" data-warning-value>{w.value}</dd>
              <dt className="text-graphite" title={w.thresholdMeaning}>threshold</dt>
              <dd className="num" data-warning-threshold>{w.threshold}</dd>
            </dl>
            <span className="block text-graphite">{w.message}</span>
            {/* A new tab, so the sheet stays open beside the explanation of its warning. */}
            <a className="mt-0.5 inline-block text-verdigris-deep underline" href={warningHelpHref(w.code)} target="_blank" rel="noopener" data-warning-help>
              What this means
            </a>
          </div>
        ))}
      </aside>
    </section>
  );
}
