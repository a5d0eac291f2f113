/**
 * The reference pages (the `docs` content collection) as the /docs pages list them: in their
 * front matter's order, with the headings a page's own table of contents shows.
 */

/** A heading as Astro's `render()` reports it. */
export interface PageHeading {
  depth: number;
  slug: string;
  text: string;
}

/** Entries in reading order: by `order`, then by title so equal orders still list the same way every build. */
export function inReadingOrder<T extends { data: { order: number; title: string } }>(entries: readonly T[]): T[] {
  return [...entries].sort((a, b) => a.data.order - b.data.order || a.data.title.localeCompare(b.data.title));
}

/** A page's own table of contents: its sections and subsections, not the page title itself. */
export function tableOfContents(headings: readonly PageHeading[]): PageHeading[] {
  return headings.filter((heading) => heading.depth === 2 || heading.depth === 3);
}

/** Where a warning code is explained: its section in the reference page on warnings. */
export function warningHelpHref(code: string): string {
  return `/docs/warnings#${code.toLowerCase()}`;
}
