import { z } from './zod';
import { sheetTitleField } from './sheets';

/** A revision number in a query: plain decimal digits from 1 (not "0x1", "1e0" or "1.0", which Number() would take). */
const revisionNumber = z
  .string({ error: 'Give a revision number.' })
  .regex(/^[1-9][0-9]{0,14}$/, 'Give the revision number as a whole number from 1, e.g. 3.')
  .transform(Number);

/** GET /api/sheets/{id}: a revision (the latest when absent). */
export const sheetQuery = z.object({ revision: revisionNumber.optional() });

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
