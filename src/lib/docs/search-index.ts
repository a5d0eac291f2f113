/**
 * Builds the search index over the reference pages and worked examples from their Markdown or MDX
 * sources, as collected into the build; runs on the server once per process
 * (src/pages/docs/search-index.json.ts), never in the browser.
 */
import MiniSearch from 'minisearch';
import remarkParse from 'remark-parse';
import { unified } from 'unified';
import type { SearchKind } from '../contract/search';
import { SEARCH_OPTIONS, type SearchDocument } from './search';

/** One page of a content collection as the builder reads it. */
export interface SearchSource {
  kind: SearchKind;
  slug: string;
  title: string;
  summary: string;
  /** The raw Markdown or MDX body, front matter removed. */
  body: string;
}

const ROUTE: Record<SearchKind, string> = { reference: '/docs', example: '/examples' };

interface MarkdownNode {
  type: string;
  depth?: number;
  value?: string;
  children?: MarkdownNode[];
}

const PHRASING = new Set(['paragraph', 'heading', 'emphasis', 'strong', 'delete', 'link', 'linkReference']);

function textOf(node: MarkdownNode): string {
  // Raw HTML and MDX components are markup, not words a reader would look for.
  if (node.type === 'html') return '';
  if (node.value !== undefined) return node.value;
  // Words of one line run together as written; separate blocks (list items, quotes) get a space.
  return (node.children ?? []).map(textOf).join(PHRASING.has(node.type) ? '' : ' ');
}

/** A page's headings and running text as plain words: MDX import and export lines dropped, Markdown syntax gone. */
export function searchableText(body: string): { headings: string[]; text: string } {
  const markdown = body.replace(/^(import|export)\s.*$/gm, '');
  const tree = unified().use(remarkParse).parse(markdown) as MarkdownNode;
  const headings: string[] = [];
  const blocks: string[] = [];
  for (const node of tree.children ?? []) {
    const text = textOf(node).replace(/\s+/g, ' ').trim();
    if (text === '') continue;
    if (node.type === 'heading' && (node.depth ?? 1) > 1) headings.push(text);
    blocks.push(text);
  }
  return { headings, text: blocks.join('\n') };
}

/** The indexed form of one page. */
export function searchDocument(source: SearchSource): SearchDocument {
  const { headings, text } = searchableText(source.body);
  return {
    id: `${source.kind}/${source.slug}`,
    kind: source.kind,
    title: source.title,
    summary: source.summary,
    href: `${ROUTE[source.kind]}/${source.slug}`,
    headings: headings.join('\n'),
    text,
  };
}

/** The serialised MiniSearch index of every page, as `loadSearchIndex` reads it back. */
export function buildSearchIndex(sources: readonly SearchSource[]): string {
  const index = new MiniSearch<SearchDocument>(SEARCH_OPTIONS);
  index.addAll(sources.map(searchDocument));
  return JSON.stringify(index);
}

/** A content collection entry as `getCollection` gives it, whatever that collection's schema. */
export interface CollectionEntryLike {
  id: string;
  body?: string;
  data: Record<string, unknown>;
}

/** A collection entry as a search source: its title, its summary (or description) and its body. */
export function sourceFromEntry(kind: SearchKind, entry: CollectionEntryLike): SearchSource {
  const { title, summary, description } = entry.data;
  return {
    kind,
    slug: entry.id,
    title: typeof title === 'string' ? title : entry.id,
    summary: typeof summary === 'string' ? summary : typeof description === 'string' ? description : '',
    body: entry.body ?? '',
  };
}
