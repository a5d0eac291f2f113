import { keepPreviousData, queryOptions, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type Row, type SortingState } from '@tanstack/react-table';
import { memo, useEffect, useMemo, useState } from 'react';
import { formatWhen, requestJson } from '../../lib/client/api';
import { REVIEW_STATE_LABELS, type SheetListPage, type SheetRow, type Wire } from '../../lib/contract';
import { SHEET_SORTS, WARNING_FILTERS } from '../../lib/validation/sheets';
import { inputClass, labelClass, primaryButton, secondaryButton } from '../form-parts';
import QueryRoot from '../QueryRoot';
import ImportDialog from './ImportDialog';
import WarningBadge from './WarningBadge';
import { revisionLabel } from '../../lib/view/revision';
import { afterNextPaint } from '../sheet/useIdle';

type Sort = (typeof SHEET_SORTS)[number];
type WarningFilter = (typeof WARNING_FILTERS)[number];

interface Filters {
  q: string;
  author: string;
  warnings: WarningFilter;
  sort: Sort;
  page: number;
  pageSize: number;
}

const PAGE_SIZES = [10, 20, 50];
/** How long the list waits for an answer before it dims the rows it shows (common practice: no busy state under ~0.2 s). */
const SLOW_ANSWER_MS = 200;
const DEFAULTS: Filters = { q: '', author: '', warnings: 'any', sort: 'updated', page: 1, pageSize: 20 };
const WARNING_LABELS: Record<WarningFilter, string> = {
  any: 'Any status',
  clean: 'Clean (no warnings)',
  note: 'Worst: note',
  caution: 'Worst: caution',
  singular: 'Worst: singular',
};
const SORT_LABELS: Record<Sort, string> = { updated: 'Last updated', title: 'Title (A–Z)', created: 'Newest first' };

/** The list state as kept in the page URL, so reloading or sharing the link shows the same list. */
function readFilters(search: string): Filters {
  const params = new URLSearchParams(search);
  const warnings = params.get('warnings') as WarningFilter | null;
  const sort = params.get('sort') as Sort | null;
  const pageSize = Number(params.get('pageSize'));
  return {
    q: params.get('q') ?? '',
    author: params.get('author') ?? '',
    warnings: warnings && WARNING_FILTERS.includes(warnings) ? warnings : DEFAULTS.warnings,
    sort: sort && SHEET_SORTS.includes(sort) ? sort : DEFAULTS.sort,
    page: Math.max(1, Math.floor(Number(params.get('page')) || 1)),
    pageSize: PAGE_SIZES.includes(pageSize) ? pageSize : DEFAULTS.pageSize,
  };
}

function filtersToSearch(filters: Filters): string {
  const params = new URLSearchParams();
  for (const key of Object.keys(DEFAULTS) as (keyof Filters)[]) {
    if (filters[key] !== DEFAULTS[key] && filters[key] !== '') params.set(key, String(filters[key]));
  }
  const text = params.toString();
  return text ? `?${text}` : '';
}

const column = createColumnHelper<Wire<SheetRow>>();

/**
 * The revision delta of a drawing's revision block: a triangle holding the revision number, here the revision
 * of the origin a derived sheet was copied from.
 */
function RevisionDelta({ revision }: { revision: number | null }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 16 14" className="h-3.5 w-4 shrink-0 self-center" data-revision-delta>
      <path d="M8 1 L15 13 L1 13 Z" className="fill-none stroke-current" strokeWidth="1.2" strokeLinejoin="round" />
      <text x="8" y="11.6" textAnchor="middle" className="fill-current num" fontSize={revision !== null && revision > 9 ? 5 : 7}>
        {revision ?? ''}
      </text>
    </svg>
  );
}

function useColumns() {
  return useMemo(
    () => [
      column.accessor('title', {
        header: 'Sheet',
        enableSorting: true,
        cell: ({ row }) => {
          const sheet = row.original;
          return (
            <div>
              <a href={`/sheets/${sheet.id}`} className="font-semibold hover:text-verdigris-deep underline decoration-rule underline-offset-2">
                {sheet.title}
              </a>
              {sheet.forkedFromSheetId && (
                <div className="mt-0.5 flex items-baseline gap-1 text-xs text-graphite" data-testid="forked-from">
                  <RevisionDelta revision={sheet.forkedFromRevision} />
                  <span>
                    derived from sheet{' '}
                    {sheet.forkedFromTitle ? (
                      <a href={`/sheets/${sheet.forkedFromSheetId}/history`} className="underline decoration-rule hover:text-verdigris-deep">
                        {sheet.forkedFromTitle}
                      </a>
                    ) : (
                      'of another team'
                    )}
                    , <span className="num">{revisionLabel(sheet.forkedFromRevision)}</span>
                  </span>
                </div>
              )}
            </div>
          );
        },
      }),
      column.accessor('tags', {
        header: 'Tags',
        enableSorting: false,
        cell: ({ getValue }) => (
          <ul className="flex flex-wrap gap-1">
            {getValue().map((tag) => (
              <li key={tag} className="bg-paper-deep border border-rule px-1.5 text-xs num">
                {tag}
              </li>
            ))}
          </ul>
        ),
      }),
      column.accessor('authorName', { header: 'Author', enableSorting: false, cell: ({ getValue }) => getValue() ?? <span className="text-graphite">—</span> }),
      column.accessor('latestRevision', {
        header: 'Rev.',
        enableSorting: false,
        cell: ({ row, getValue }) => (
          <a href={`/sheets/${row.original.id}/history`} className="num hover:text-verdigris-deep underline decoration-rule" title="Revision history">
            {revisionLabel(getValue())}
          </a>
        ),
      }),
      column.accessor('reviewState', {
        header: 'Checking',
        enableSorting: false,
        cell: ({ row, getValue }) => (
          <span className="text-xs whitespace-nowrap" data-review-badge={getValue()}>
            <span className={`border px-1.5 ${getValue() === 'checked' ? 'border-verdigris' : getValue() === 'returned' ? 'border-ochre' : 'border-rule'}`}>
              {REVIEW_STATE_LABELS[getValue()]} <span className="num">{revisionLabel(row.original.latestRevision)}</span>
            </span>
            {row.original.lastCheckedRevision !== null && row.original.lastCheckedRevision !== row.original.latestRevision && (
              <span className="ml-1 text-graphite num">checked {revisionLabel(row.original.lastCheckedRevision)}</span>
            )}
          </span>
        ),
      }),
      column.accessor((sheet) => sheet.summary?.worst ?? null, {
        id: 'warnings',
        header: 'Warnings',
        enableSorting: false,
        cell: ({ row }) => <WarningBadge worst={row.original.summary?.worst} count={row.original.summary?.warningCount} codes={row.original.summary?.warningCodes} />,
      }),
      column.accessor('updatedAt', {
        id: 'updated',
        header: 'Updated',
        enableSorting: true,
        cell: ({ getValue }) => <span className="num text-xs whitespace-nowrap">{formatWhen(getValue())}</span>,
      }),
    ],
    [],
  );
}

/** The rows of one answer; a keystroke in the search box re-renders the form, not the rows it has not changed yet (the row model keeps its array while the data stay). */
const SheetRows = memo(function SheetRows({ rows }: { rows: Row<Wire<SheetRow>>[] }) {
  return rows.map((row) => (
    <tr key={row.id} className="border-b border-rule align-top hover:bg-paper-deep/60" data-sheet-title={row.original.title}>
      {row.getVisibleCells().map((cell) => (
        <td key={cell.id} className="py-2 px-3">
          {flexRender(cell.column.columnDef.cell, cell.getContext())}
        </td>
      ))}
    </tr>
  ));
});

/**
 * True once `on` has stayed true for `delayMs`: a list that answers quickly is not dimmed and lit again, which cost a
 * frame of its own (and a layer for the table) on a keystroke's way to its rows.
 */
function useTrueAfter(on: boolean, delayMs: number): boolean {
  const [late, setLate] = useState(false);
  useEffect(() => {
    if (!on) return undefined;
    const timer = setTimeout(() => setLate(true), delayMs);
    return () => {
      clearTimeout(timer);
      setLate(false);
    };
  }, [on, delayMs]);
  return on && late;
}

/** One page of the team's sheets as the filters ask for it. */
function sheetsPageQuery(teamId: string, filters: Filters) {
  return queryOptions({
    queryKey: ['sheets', teamId, filters],
    // A query left behind by a newer filter is aborted (react-query aborts the signal once no one reads the query), so no stale answer shows or holds the connection.
    queryFn: ({ signal }) => {
      const params = new URLSearchParams({ team: teamId, warnings: filters.warnings, sort: filters.sort, page: String(filters.page), pageSize: String(filters.pageSize) });
      if (filters.q) params.set('q', filters.q);
      if (filters.author) params.set('author', filters.author);
      return requestJson<Wire<SheetListPage>>(`/api/sheets?${params}`, { signal });
    },
    placeholderData: keepPreviousData,
  });
}

function SheetList({ teamId, teamName, canWrite, authors, initialSearch }: SheetTableProps) {
  const queryClient = useQueryClient();
  const [filters, setFilters] = useState<Filters>(() => readFilters(initialSearch));
  const [search, setSearch] = useState(filters.q);
  // The request goes out from the event: started by the query after the render, it waited for the whole re-render of the
  // form and table (6 to 44 ms after the keystroke). The render's query finds it under the same key and waits for it.
  const show = (next: Filters) => {
    void queryClient.prefetchQuery(sheetsPageQuery(teamId, next));
    setFilters(next);
  };
  const update = (change: Partial<Filters>) => show({ ...filters, page: 1, ...change });

  // Every key searches at once (the list answers well within a keystroke's pause); the query below keeps only the newest answer.
  const typeSearch = (text: string) => {
    setSearch(text);
    if (filters.q !== text.trim()) show({ ...filters, q: text.trim(), page: 1 });
  };

  const query = useQuery(sheetsPageQuery(teamId, filters));

  // The page URL follows the rows shown, once they are painted: replacing the URL costs Chromium a few milliseconds (and
  // lays out whatever changed since the last frame), which on the keystroke's path delayed its request and rows.
  const shownSearch = query.isPlaceholderData ? undefined : filtersToSearch(filters);
  useEffect(() => {
    if (shownSearch === undefined || shownSearch === window.location.search) return undefined;
    return afterNextPaint(() => window.history.replaceState(null, '', `${window.location.pathname}${shownSearch}`));
  }, [shownSearch]);

  const slowFetch = useTrueAfter(query.isFetching, SLOW_ANSWER_MS);
  const columns = useColumns();
  const pageCount = query.data ? Math.max(1, Math.ceil(query.data.total / filters.pageSize)) : 1;
  const sorting: SortingState = filters.sort === 'created' ? [] : [{ id: filters.sort, desc: filters.sort === 'updated' }];
  const table = useReactTable({
    data: query.data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (row) => row.id,
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableSortingRemoval: false,
    pageCount,
    state: { sorting, pagination: { pageIndex: filters.page - 1, pageSize: filters.pageSize } },
    onSortingChange: (updater) => {
      const next = typeof updater === 'function' ? updater(sorting) : updater;
      const id = next[0]?.id;
      if (id === 'title' || id === 'updated') update({ sort: id });
    },
    onPaginationChange: (updater) => {
      const next = typeof updater === 'function' ? updater({ pageIndex: filters.page - 1, pageSize: filters.pageSize }) : updater;
      show({ ...filters, page: next.pageIndex + 1, pageSize: next.pageSize });
    },
  });

  const filtered = filters.q !== '' || filters.author !== '' || filters.warnings !== 'any';
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-4 justify-between">
        <div>
          <h1 className="text-2xl font-semibold">Sheets</h1>
          <p className="text-sm text-graphite">{teamName}</p>
        </div>
        <div className="flex gap-3 items-center">
          {canWrite && <ImportDialog teamId={teamId} />}
          {canWrite && (
            <a href="/sheets/new" className={primaryButton} data-testid="new-sheet">
              New sheet
            </a>
          )}
        </div>
      </div>

      <form className="grid gap-3 md:grid-cols-[3fr_2fr_2fr_2fr] items-end border-2 border-ink bg-paper p-4" role="search" onSubmit={(e) => e.preventDefault()}>
        <label className={labelClass}>
          Search title or tag
          <input
            type="search"
            name="q"
            value={search}
            onChange={(e) => typeSearch(e.target.value)}
            placeholder="peg, cylinder, review…"
            className={inputClass}
            data-testid="sheet-search"
          />
        </label>
        <label className={labelClass}>
          Author
          <select name="author" value={filters.author} onChange={(e) => update({ author: e.target.value })} className={inputClass} data-testid="author-filter">
            <option value="">Anyone</option>
            {authors.map((author) => (
              <option key={author.id} value={author.id}>
                {author.name}
              </option>
            ))}
          </select>
        </label>
        <label className={labelClass}>
          Warning status
          <select
            name="warnings"
            value={filters.warnings}
            onChange={(e) => update({ warnings: e.target.value as WarningFilter })}
            className={inputClass}
            data-testid="warning-filter"
          >
            {WARNING_FILTERS.map((value) => (
              <option key={value} value={value}>
                {WARNING_LABELS[value]}
              </option>
            ))}
          </select>
        </label>
        <label className={labelClass}>
          Sort
          <select name="sort" value={filters.sort} onChange={(e) => update({ sort: e.target.value as Sort })} className={inputClass} data-testid="sheet-sort">
            {SHEET_SORTS.map((value) => (
              <option key={value} value={value}>
                {SORT_LABELS[value]}
              </option>
            ))}
          </select>
        </label>
      </form>

      {query.isError ? (
        <p className="text-sm text-sienna border-l-4 border-sienna pl-3" role="alert">
          {query.error.message}
        </p>
      ) : (
        <div className="overflow-x-auto border-2 border-ink bg-paper">
          <table className={`w-full text-sm border-collapse ${slowFetch ? 'opacity-70' : ''}`} data-testid="sheet-table" aria-busy={query.isFetching}>
            <thead>
              {table.getHeaderGroups().map((group) => (
                <tr key={group.id} className="text-left border-b-2 border-ink bg-paper-deep">
                  {group.headers.map((header) => {
                    const sorted = header.column.getIsSorted();
                    return (
                      <th
                        key={header.id}
                        className="py-2 px-3 font-semibold"
                        aria-sort={sorted ? (sorted === 'desc' ? 'descending' : 'ascending') : undefined}
                      >
                        {header.column.getCanSort() ? (
                          <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex gap-1 items-center hover:text-verdigris-deep">
                            {flexRender(header.column.columnDef.header, header.getContext())}
                            <span className="num text-xs text-graphite" aria-hidden="true">
                              {sorted === 'desc' ? '▼' : sorted === 'asc' ? '▲' : '↕'}
                            </span>
                          </button>
                        ) : (
                          flexRender(header.column.columnDef.header, header.getContext())
                        )}
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              <SheetRows rows={table.getRowModel().rows} />
              {query.isPending && (
                <tr>
                  <td colSpan={columns.length} className="py-6 px-3 text-graphite">
                    Loading sheets…
                  </td>
                </tr>
              )}
              {query.data && query.data.items.length === 0 && (
                <tr>
                  <td colSpan={columns.length} className="py-6 px-3 text-graphite" data-testid="no-sheets">
                    {filtered ? 'No sheet matches these filters.' : 'This team has no sheets yet.'}
                  </td>
                </tr>
              )}
            </tbody>
          </table>
        </div>
      )}

      <nav className="flex flex-wrap items-center justify-between gap-3 text-sm" aria-label="Pages">
        <p className="text-graphite" data-testid="sheet-count">
          {query.data ? (
            <>
              <span className="num">{query.data.total}</span> sheet{query.data.total === 1 ? '' : 's'}
              {filtered && ' match'} · page <span className="num">{filters.page}</span> of <span className="num">{pageCount}</span>
            </>
          ) : (
            ' '
          )}
        </p>
        <div className="flex items-center gap-2">
          <label className="text-graphite">
            Per page{' '}
            <select
              value={filters.pageSize}
              onChange={(e) => table.setPageSize(Number(e.target.value))}
              className="border-2 border-ink bg-paper px-1 py-0.5 num text-sm"
            >
              {PAGE_SIZES.map((size) => (
                <option key={size} value={size}>
                  {size}
                </option>
              ))}
            </select>
          </label>
          <button type="button" className={secondaryButton} onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </button>
          <button type="button" className={secondaryButton} onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </button>
        </div>
      </nav>
    </div>
  );
}

export interface SheetTableProps {
  teamId: string;
  teamName: string;
  canWrite: boolean;
  authors: { id: string; name: string }[];
  /** The page URL's query string when it was served, so the first render already shows the list asked for. */
  initialSearch: string;
}

/** The team's sheets: server-side search, filters, sorting and pages through GET /api/sheets. */
export default function SheetTable(props: SheetTableProps) {
  return (
    <QueryRoot>
      <SheetList {...props} />
    </QueryRoot>
  );
}
