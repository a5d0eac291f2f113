import { useId, useRef, useState, type KeyboardEvent } from 'react';
import type MiniSearch from 'minisearch';
import { requestJson } from '../../lib/client/api';
import type { SearchEntry } from '../../lib/contract/search';
import { loadSearchIndex, SEARCH_INDEX_PATH, searchPages, type SearchDocument, type SerialisedSearchIndex } from '../../lib/docs/search';

const KIND_LABEL: Record<SearchEntry['kind'], string> = { reference: 'Reference', example: 'Worked example' };

type IndexState = { status: 'idle' | 'loading' } | { status: 'ready'; index: MiniSearch<SearchDocument> } | { status: 'failed'; message: string };

/**
 * The header's search box over the reference pages and worked examples. The index is fetched on first focus,
 * so a page that is only read never downloads it. Arrow keys move through the hits, Enter opens
 * one, Escape clears the box.
 */
export default function DocsSearch() {
  const [state, setState] = useState<IndexState>({ status: 'idle' });
  const [query, setQuery] = useState('');
  const [active, setActive] = useState(0);
  const started = useRef(false);
  const listId = useId();

  const load = () => {
    if (started.current) return;
    started.current = true;
    setState({ status: 'loading' });
    requestJson<SerialisedSearchIndex>(SEARCH_INDEX_PATH)
      .then((serialised) => setState({ status: 'ready', index: loadSearchIndex(serialised) }))
      .catch((error: Error) => {
        started.current = false;
        setState({ status: 'failed', message: error.message });
      });
  };

  const hits = state.status === 'ready' ? searchPages(state.index, query) : [];
  const open = query.trim() !== '';
  const chosen = Math.min(active, Math.max(0, hits.length - 1));

  const onKeyDown = (event: KeyboardEvent<HTMLInputElement>) => {
    if (event.key === 'ArrowDown' || event.key === 'ArrowUp') {
      event.preventDefault();
      if (hits.length > 0) setActive((chosen + (event.key === 'ArrowDown' ? 1 : hits.length - 1)) % hits.length);
    } else if (event.key === 'Enter' && hits[chosen]) {
      event.preventDefault();
      window.location.assign(hits[chosen].href);
    } else if (event.key === 'Escape') {
      setQuery('');
      setActive(0);
    }
  };

  return (
    <div className="relative w-56" data-docs-search>
      <label className="sr-only" htmlFor={`${listId}-input`}>
        Search the reference and examples
      </label>
      <input
        id={`${listId}-input`}
        type="search"
        role="combobox"
        aria-expanded={open}
        aria-controls={listId}
        aria-autocomplete="list"
        aria-activedescendant={open && hits[chosen] ? `${listId}-${chosen}` : undefined}
        autoComplete="off"
        placeholder="Search docs and examples"
        className="w-full border-2 border-ink bg-paper px-2 py-1 text-sm focus:outline-none focus:ring-2 focus:ring-verdigris"
        value={query}
        onFocus={load}
        onChange={(event) => {
          load();
          setQuery(event.target.value);
          setActive(0);
        }}
        onKeyDown={onKeyDown}
      />
      {open && (
        <div className="absolute left-0 right-0 z-20 mt-1 border-2 border-ink bg-paper shadow-[4px_4px_0_0_var(--color-ink)]">
          {state.status === 'failed' ? (
            <p className="px-3 py-2 text-sm text-sienna" role="alert">
              The search index could not be loaded: {state.message}
            </p>
          ) : state.status !== 'ready' ? (
            <p className="px-3 py-2 text-sm text-graphite">Loading the index…</p>
          ) : hits.length === 0 ? (
            <p className="px-3 py-2 text-sm text-graphite" role="status">
              No page matches “{query.trim()}”.
            </p>
          ) : null}
          <ul id={listId} role="listbox" aria-label="Search results" className={hits.length === 0 ? 'hidden' : 'max-h-96 overflow-y-auto'}>
            {hits.map((hit, i) => (
              <li key={hit.id} id={`${listId}-${i}`} role="option" aria-selected={i === chosen} className={i === chosen ? 'bg-paper-deep' : ''} onMouseEnter={() => setActive(i)}>
                <a href={hit.href} className="block px-3 py-2 text-sm" tabIndex={-1}>
                  <span className="block text-[10px] font-semibold uppercase tracking-wide text-verdigris-deep">{KIND_LABEL[hit.kind]}</span>
                  <span className="block font-semibold text-ink">{hit.title}</span>
                  {hit.summary && <span className="block text-xs text-graphite">{hit.summary}</span>}
                </a>
              </li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
