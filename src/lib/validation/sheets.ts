import { z } from './zod';

export const sheetTitleField = z.string().trim().min(1, 'Give the sheet a title.').max(160, 'Keep the title under 160 characters.');
export const tagsField = z.array(z.string().trim().min(1).max(40)).max(20).default([]);

/** The title and tags name the new sheet; the document is stored as sent, and saves read the title and tags from it. */
export const createSheetBody = z.object({
  teamId: z.string().min(1),
  title: sheetTitleField,
  tags: tagsField,
  document: z.unknown(),
  message: z.string().max(500).default('Created'),
});

/** A save carries only the document: the sheet's title and tags are read from it. */
export const saveRevisionBody = z.object({
  baseRevision: z.number().int().min(1),
  document: z.unknown(),
  message: z.string().max(500).default(''),
});

export const forkBody = z
  .object({
    revision: z.number().int().min(1).optional(),
    /** Team that receives the fork; the source sheet's team when absent. */
    teamId: z.string().min(1).optional(),
    title: sheetTitleField.optional(),
  })
  .default({});

export const SHEET_SORTS = ['updated', 'title', 'created'] as const;
export const WARNING_FILTERS = ['any', 'clean', 'note', 'caution', 'singular'] as const;

export const listSheetsQuery = z.object({
  team: z.string().min(1),
  q: z.string().trim().max(100).optional(),
  author: z.string().optional(),
  warnings: z.enum(WARNING_FILTERS).default('any'),
  sort: z.enum(SHEET_SORTS).default('updated'),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
});
export type ListSheetsQuery = z.infer<typeof listSheetsQuery>;

export const REVISION_PAGE_SIZE = 50;

/** A page of a sheet's revision history; the size is capped so one request stays small whatever the history's length. */
export const listRevisionsQuery = z.object({
  page: z.coerce.number().int().min(1).max(1_000_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(REVISION_PAGE_SIZE),
});
export type ListRevisionsQuery = z.infer<typeof listRevisionsQuery>;

/** A revision number in a route path (`/revisions/3/...`). */
export const revisionParam = z.object({
  revision: z.coerce.number({ error: 'expected a revision number' }).int({ error: 'expected a whole revision number' }).min(1, { error: 'revision numbers start at 1' }).max(1_000_000_000),
});
