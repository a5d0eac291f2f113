import { and, eq, isNull, sql } from 'drizzle-orm';
import type { Database } from '../../db';
import { sheetRevisions, sheets } from '../../db/schema';

export interface NewSheetInput {
  teamId: string;
  title: string;
  tags?: string[];
  inputs: unknown;
  summary?: unknown;
  authorId: string | null;
  message?: string;
}

/** Creates a sheet with its first revision in one transaction; resolves only once committed. */
export async function createSheet(database: Database, input: NewSheetInput): Promise<{ sheetId: string; revision: number }> {
  return database.transaction(async (tx) => {
    const [sheet] = await tx
      .insert(sheets)
      .values({ teamId: input.teamId, title: input.title, tags: input.tags ?? [], latestRevision: 1, createdBy: input.authorId })
      .returning({ id: sheets.id });
    await tx.insert(sheetRevisions).values({
      sheetId: sheet.id,
      number: 1,
      inputs: input.inputs,
      summary: input.summary ?? null,
      message: input.message ?? 'Created',
      authorId: input.authorId,
    });
    return { sheetId: sheet.id, revision: 1 };
  });
}

export type SaveOutcome =
  | { status: 'saved'; revision: number }
  | { status: 'stale'; latestRevision: number }
  | { status: 'missing' };

/**
 * Appends a revision on top of `baseRevision`. A save based on anything but the latest
 * revision is refused as stale so that no one's work is silently overwritten.
 */
export async function saveRevision(
  database: Database,
  sheetId: string,
  baseRevision: number,
  revision: { inputs: unknown; summary?: unknown; message?: string; authorId: string | null },
): Promise<SaveOutcome> {
  return database.transaction(async (tx) => {
    const [sheet] = await tx
      .select({ latest: sheets.latestRevision })
      .from(sheets)
      .where(and(eq(sheets.id, sheetId), isNull(sheets.deletedAt)));
    if (!sheet) return { status: 'missing' };
    if (sheet.latest !== baseRevision) return { status: 'stale', latestRevision: sheet.latest };
    const number = baseRevision + 1;
    await tx.insert(sheetRevisions).values({
      sheetId,
      number,
      parentRevision: baseRevision,
      inputs: revision.inputs,
      summary: revision.summary ?? null,
      message: revision.message ?? '',
      authorId: revision.authorId,
    });
    await tx
      .update(sheets)
      .set({ latestRevision: number, updatedAt: sql`(unixepoch('subsec') * 1000)` })
      .where(eq(sheets.id, sheetId));
    return { status: 'saved', revision: number };
  });
}
