import type { APIRoute } from 'astro';
import { getCollection } from 'astro:content';
import { collections } from '../../content.config';
import { buildSearchIndex, sourceFromEntry } from '../../lib/docs/search-index';

// Written once by the build into the client folder and served as a file: the pages it indexes are
// part of the build too, so the index can never be older or newer than they are.
export const prerender = true;

/** Declared by the worked examples; read only where this build has that collection. */
const EXAMPLES: string = 'examples';

export const GET: APIRoute = async () => {
  const reference = await getCollection('docs');
  const examples = EXAMPLES in collections ? await getCollection(EXAMPLES as keyof typeof collections) : [];
  const sources = [...reference.map((entry) => sourceFromEntry('reference', entry)), ...examples.map((entry) => sourceFromEntry('example', entry))];
  return new Response(buildSearchIndex(sources), { headers: { 'Content-Type': 'application/json; charset=utf-8' } });
};
