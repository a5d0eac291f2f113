/**
 * The search over the reference pages and worked examples, as the browser runs it: MiniSearch
 * options shared with the index builder (an index loads only with the options it was built with),
 * loading the served index and asking it. A leaf module the browser may import.
 */
import MiniSearch, { type AsPlainObject, type Options, type SearchOptions } from 'minisearch';
import type { SearchEntry } from '../contract/search';

/** Where the server answers with the index; the search box fetches it on first use. */
export const SEARCH_INDEX_PATH = '/docs/search-index.json';

/** One page as indexed: the stored fields plus the text that is searched but not shipped back. */
export interface SearchDocument extends SearchEntry {
  headings: string;
  text: string;
}

/** A title or heading match outranks the same word in running text (common practice for documentation search). */
const QUERY_OPTIONS: SearchOptions = {
  prefix: true,
  fuzzy: 0.2,
  combineWith: 'AND',
  boost: { title: 4, headings: 2, summary: 2 },
};

export const SEARCH_OPTIONS: Options<SearchDocument> = {
  fields: ['title', 'summary', 'headings', 'text'],
  storeFields: ['kind', 'title', 'summary', 'href'],
  searchOptions: QUERY_OPTIONS,
};

/** The index as served (what MiniSearch's toJSON gives), parsed. */
export type SerialisedSearchIndex = AsPlainObject;

/** The served index loaded back with the builder's options. */
export function loadSearchIndex(serialised: SerialisedSearchIndex): MiniSearch<SearchDocument> {
  return MiniSearch.loadJS<SearchDocument>(serialised, SEARCH_OPTIONS);
}

/** The best `limit` pages for what a reader typed, best first; nothing for a blank query. */
export function searchPages(index: MiniSearch<SearchDocument>, query: string, limit = 8): SearchEntry[] {
  if (query.trim() === '') return [];
  return index.search(query).slice(0, limit).map((hit) => ({
    id: String(hit.id),
    kind: hit.kind as SearchEntry['kind'],
    title: String(hit.title),
    summary: String(hit.summary),
    href: String(hit.href),
  }));
}
