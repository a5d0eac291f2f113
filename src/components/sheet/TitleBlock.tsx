import { memo } from 'react';
import { REVIEW_STATE_LABELS, type ReviewState, type SheetLink } from '../../lib/contract';
import { SafetyCaution } from './SafetyCaution';
import { revisionLabel } from '../../lib/view/revision';

interface TitleBlockProps {
  sheetId: string;
  title: string;
  revision: number;
  latestRevision: number;
  author: string | null;
  /** Who signed this revision as checked and when (ISO 8601), while its latest signature is a check. */
  checkedBy: string | null;
  checkedAt: string | null;
  date: string;
  /** The latest revision's checking state, and the newest revision that stands checked. */
  reviewState: ReviewState;
  lastCheckedRevision: number | null;
  forkedFrom: SheetLink | null;
  forks: SheetLink[];
  dirty: boolean;
}

function Cell({ label, children, wide, span3 }: { label: string; children: React.ReactNode; wide?: boolean; span3?: boolean }) {
  return (
    <div className={`border-ink px-3 py-1.5 ${wide ? 'col-span-2' : ''} ${span3 ? 'col-span-2 md:col-span-3' : ''}`}>
      <div className="text-[10px] uppercase tracking-[0.14em] text-graphite">{label}</div>
      <div className="text-sm font-semibold">{children}</div>
    </div>
  );
}

/** The drawing-office title block (after ISO 7200): what the sheet is, which revision, who made and checked it. */
function TitleBlock(props: TitleBlockProps) {
  const { sheetId, revision, latestRevision } = props;
  const date = new Date(props.date);
  const checkedAt = props.checkedAt ? new Date(props.checkedAt) : null;
  const links = [
    { href: `/sheets/${sheetId}/history`, label: 'History' },
    { href: `/sheets/${sheetId}/compare?from=${Math.max(1, revision - 1)}&to=${revision}`, label: 'Compare' },
    { href: `/sheets/${sheetId}/report?revision=${revision}`, label: 'Report' },
    ...(props.forkedFrom
      ? [{ href: `/sheets/${props.forkedFrom.id}/compare?from=${props.forkedFrom.revision}&to=${revision}&toSheet=${sheetId}`, label: 'Compare with origin' }]
      : []),
    { href: `/api/sheets/${sheetId}/export?format=json&revision=${revision}`, label: 'Export JSON' },
    { href: `/api/sheets/${sheetId}/export?format=csv&revision=${revision}`, label: 'Export CSV (joint rates)' },
  ];
  return (
    <header className="border-2 border-ink bg-paper" data-title-block>
      <div className="grid grid-cols-2 divide-x divide-y divide-ink md:grid-cols-6 [&>*]:border-ink">
        <Cell label="Sheet" wide>
          <span data-sheet-title>{props.title}</span>
        </Cell>
        <Cell label="Revision">
          <span className="num" data-revision>{revision}</span>
          <span className="ml-1 text-xs font-normal text-graphite">
            {revision === latestRevision ? 'latest' : `of ${latestRevision}`}
            {props.dirty ? ' · unsaved changes' : ''}
          </span>
        </Cell>
        <Cell label="Author">{props.author ?? '—'}</Cell>
        <Cell label="Checked by">
          <span data-checked-by>{props.checkedBy ?? '—'}</span>
          {checkedAt && !Number.isNaN(checkedAt.getTime()) && (
            <time className="num ml-1 text-xs font-normal text-graphite" dateTime={props.checkedAt ?? undefined} data-checked-on>
              {checkedAt.toISOString().slice(0, 10)}
            </time>
          )}
        </Cell>
        <Cell label="Date">
          <time className="num" dateTime={props.date}>
            {Number.isNaN(date.getTime()) ? '—' : date.toISOString().slice(0, 10)}
          </time>
        </Cell>
        <Cell label="Status">
          <span data-review-state={props.reviewState}>{REVIEW_STATE_LABELS[props.reviewState]}</span>
          <span className="ml-1 text-xs font-normal text-graphite" data-last-checked>
            {props.lastCheckedRevision === null
              ? '· never checked'
              : props.lastCheckedRevision === latestRevision
                ? ''
                : `· last checked ${revisionLabel(props.lastCheckedRevision)}`}
          </span>
        </Cell>
        <Cell label="Origin" wide>
          {props.forkedFrom ? (
            <a className="underline decoration-rule hover:text-verdigris-deep" href={`/sheets/${props.forkedFrom.id}?revision=${props.forkedFrom.revision}`} data-forked-from>
              Derived from {props.forkedFrom.title}, <span className="num">{revisionLabel(props.forkedFrom.revision)}</span>
            </a>
          ) : (
            <span className="font-normal text-graphite">original</span>
          )}
        </Cell>
        <Cell label="Forks" span3>
          {props.forks.length === 0 ? (
            <span className="font-normal text-graphite">none</span>
          ) : (
            <span className="flex flex-wrap gap-x-3 font-normal">
              {props.forks.map((f) => (
                <a key={f.id} className="underline decoration-rule hover:text-verdigris-deep" href={`/sheets/${f.id}`}>
                  {f.title} <span className="num text-xs">(from {revisionLabel(f.revision)})</span>
                </a>
              ))}
            </span>
          )}
        </Cell>
        <nav aria-label="Sheet" className="col-span-2 flex flex-wrap items-center gap-x-3 px-3 py-1.5 text-sm md:col-span-6">
          {links.map((link) => (
            <a key={link.label} className="underline decoration-rule hover:text-verdigris-deep" href={link.href}>
              {link.label}
            </a>
          ))}
        </nav>
      </div>
      <div className="border-t border-ink px-3 py-2">
        <SafetyCaution />
      </div>
    </header>
  );
}

export default memo(TitleBlock);
