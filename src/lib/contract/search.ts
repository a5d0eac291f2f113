/** Where a search hit belongs: a reference page under /docs or a worked example under /examples. */
export type SearchKind = 'reference' | 'example';

/** What the search index (`/docs/search-index.json`) keeps of each page to show as a hit. */
export interface SearchEntry {
  /** `reference/units`, `example/steering`: unique across both collections. */
  id: string;
  kind: SearchKind;
  title: string;
  summary: string;
  /** The page's path, e.g. `/docs/units`. */
  href: string;
}
