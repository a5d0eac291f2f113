import { z } from './zod';

/** The largest revision number a comparison may name; far beyond any sheet's history, well inside a safe integer. */
export const MAX_COMPARED_REVISION = 1e9;

/**
 * POST /api/sheets/{id}/logs/{logId}/comparisons: the mapping (checked field by field by the
 * engine's schema, so its errors name `mapping.<field>`) and the revision to judge against.
 */
export const runComparisonBody = z.object({
  mapping: z.unknown().refine((value) => value !== undefined, 'Give the mapping of the log\'s columns.'),
  revision: z.number().int('Give the revision as a whole number.').min(1).max(MAX_COMPARED_REVISION).optional(),
});

/** GET /api/sheets/{id}/logs/{logId}/comparisons/{comparisonId}: JSON, `format=csv` for the statistics table, `format=series` for the per-sample table. */
export const comparisonQuery = z.object({
  format: z.enum(['json', 'csv', 'series']).default('json'),
});
