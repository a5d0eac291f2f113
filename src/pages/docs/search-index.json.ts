import { createHash } from 'node:crypto';
import type { APIRoute } from 'astro';
import { getCollection } from 'astro:content';
import { collections } from '../../content.config';
import { buildSearchIndex, sourceFromEntry } from '../../lib/docs/search-index';

/** Declared by the worked examples; read only where this build has that collection. */
const EXAMPLES: string = 'examples';

async function buildIndex(): Promise<string> {
  const reference = await getCollection('docs');
  const examples = EXAMPLES in collections ? await getCollection(EXAMPLES as keyof typeof collections) : [];
  const sources = [...reference.map((entry) => sourceFromEntry('reference', entry)), ...examples.map((entry) => sourceFromEntry('example', entry))];
  return buildSearchIndex(sources);
}

// The collections are part of the build, so the index is built once per process and is the same
// for every caller; its ETag lets a browser keep it until the next deployment changes it.
let index: Promise<{ body: string; etag: string }> | null = null;

async function indexWithTag(): Promise<{ body: string; etag: string }> {
  const body = await buildIndex();
  return { body, etag: `"${createHash('sha256').update(body).digest('base64url')}"` };
}

export const GET: APIRoute = async ({ request }) => {
  index ??= indexWithTag().catch((error: unknown) => {
    index = null;
    throw error;
  });
  const { body, etag } = await index;
  const headers = { 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'no-cache', ETag: etag };
  if (request.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
  return new Response(body, { headers });
};
