import { z } from 'zod';
import { sheetTitleField } from './sheets';

const revisionNumber = z.coerce.number({ error: 'Give a revision number.' }).int('Give a whole revision number.').min(1, 'Revisions start at 1.');

/** GET /api/sheets/{id}/compare: two revisions, the second optionally of another sheet (a fork or an origin). */
export const compareQuery = z.object({
  from: revisionNumber,
  to: revisionNumber,
  toSheet: z.string().min(1).optional(),
});

export const EXPORT_FORMATS = ['json', 'csv'] as const;

/** GET /api/sheets/{id}/export: a revision (the latest when absent) as the sheet document or its results. */
export const exportQuery = z.object({
  revision: revisionNumber.optional(),
  format: z.enum(EXPORT_FORMATS, { error: 'Choose json or csv.' }).default('json'),
});

/**
 * The report page: a revision (the latest when absent) and the finger whose derivation it shows
 * (the first when absent); one finger at a time keeps the report of a large hand small.
 */
export const reportQuery = z.object({
  revision: revisionNumber.optional(),
  derivation: z.coerce.number().int().min(0).default(0),
});

/** POST /api/sheets/import: a sheet file's text for a team, as JSON or as multipart form fields. */
export const importBody = z.object({
  teamId: z.string({ error: 'Choose the team to import into.' }).min(1, 'Choose the team to import into.'),
  fileName: z.string().trim().max(255).default('sheet.json'),
  content: z.string({ error: 'Choose a sheet file (.json).' }).min(1, 'The file is empty.'),
  title: sheetTitleField.optional(),
});
export type ImportBody = z.infer<typeof importBody>;
