import { z } from './zod';

export const commentBody = z.object({
  revision: z.number().int().min(1),
  body: z.string().trim().min(1, 'Write something first.').max(4000, 'Keep a comment under 4,000 characters.'),
  /** Section or output the comment is about, e.g. "results" or "finger.0.rollRate". */
  anchor: z.string().trim().max(120).optional(),
});

export const REVIEW_VERDICTS = ['approved', 'changes-requested'] as const;

export const reviewBody = z.object({
  revision: z.number().int().min(1),
  verdict: z.enum(REVIEW_VERDICTS),
  body: z.string().trim().max(4000, 'Keep the review note under 4,000 characters.').default(''),
});
