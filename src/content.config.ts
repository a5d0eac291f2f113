import { defineCollection, z } from 'astro:content';
import { glob } from 'astro/loaders';

/** The reference pages (content/docs/*.md), shown under /docs in `order`, readable signed out. */
const docs = defineCollection({
  loader: glob({ pattern: '*.md', base: './content/docs' }),
  schema: z.object({
    title: z.string().min(1),
    /** One sentence for the table of contents and the search results. */
    summary: z.string().min(1),
    order: z.number().int().nonnegative(),
  }),
});

export const collections = { docs };
