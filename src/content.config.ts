import { defineCollection, z } from 'astro:content';
import { glob } from 'astro/loaders';
import { SHEET_SECTION_IDS } from './lib/examples/sections';

/**
 * Worked examples: MDX in content/examples, each built on sheet documents in content/examples/sheets
 * (the first its own, opened by "Open as a new sheet"), with the editor sections it explains.
 */
const examples = defineCollection({
  loader: glob({ base: './content/examples', pattern: '*.mdx' }),
  schema: z.object({
    title: z.string().min(1),
    summary: z.string().min(1),
    order: z.number().int().nonnegative(),
    sections: z.array(z.enum(SHEET_SECTION_IDS)).min(1),
    sheets: z.array(z.string().regex(/^[a-z0-9-]+\.json$/)).min(1),
    /** A controller log the example checks: a run of the sheet with these variable values, compared within these tolerances. */
    log: z.object({ controller: z.string().min(1), tolerances: z.object({ rate: z.string(), slip: z.string() }) }).optional(),
  }),
});


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

export const collections = { examples, docs };
