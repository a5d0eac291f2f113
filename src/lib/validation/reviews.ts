import { OUTPUTS } from '../sheet/outputs';
import { z } from './zod';

/** Longest remark or signature note, in characters: a page of Markdown, enough for a worked correction. */
export const MAX_REMARK_LENGTH = 4000;

/** Sheet sections a remark may be anchored to: the sheet page's numbered sections. */
export const REMARK_SECTIONS = ['sheet-summary', 'object', 'hand', 'motion', 'variables', 'results', 'derivation', 'notes'] as const;

const REMARK_ANCHORS = new Set<string>([...REMARK_SECTIONS, ...OUTPUTS.map((output) => `output.${output.id}`)]);

/** An anchor names a section ("results") or an output of the catalogue ("output.<id>"). */
const anchor = z
  .string()
  .trim()
  .max(120)
  .refine((value) => REMARK_ANCHORS.has(value), {
    message: `Anchor a remark to a section (${REMARK_SECTIONS.join(', ')}) or to an output of the results as "output.<id>".`,
  });

export const commentBody = z.object({
  revision: z.number().int().min(1),
  body: z.string().trim().min(1, 'Write something first.').max(MAX_REMARK_LENGTH, 'Keep a remark under 4,000 characters.'),
  anchor: anchor.optional(),
  /** The remark this one answers. */
  parentId: z.uuid('Reply to a remark by its id.').optional(),
});

/** Marks a remark's thread resolved or open again. */
export const remarkResolution = z.object({
  id: z.uuid('Name the remark by its id.'),
  resolved: z.boolean(),
});

export const REVIEW_VERDICTS = ['checked', 'returned'] as const;

const verdict = z.string().refine((value) => (REVIEW_VERDICTS as readonly string[]).includes(value), {
  message: 'Sign a revision as "checked" or "returned" ("approved" and "changes-requested" are no longer accepted).',
});

export const reviewBody = z
  .object({
    revision: z.number().int().min(1),
    verdict: verdict.transform((value) => value as (typeof REVIEW_VERDICTS)[number]),
    body: z.string().trim().max(MAX_REMARK_LENGTH, 'Keep the signature note under 4,000 characters.').default(''),
  })
  .refine((value) => value.verdict !== 'returned' || value.body.length > 0, {
    message: 'Say what needs correcting when returning a revision.',
    path: ['body'],
  });
