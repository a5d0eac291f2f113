import { asc, desc, eq, sql } from 'drizzle-orm';
import type { Database } from '../../db';
import { comments, reviews, sheets, users } from '../../db/schema';

export type Verdict = 'approved' | 'changes-requested';

/** Every comment on a sheet, oldest first, with its author's name. */
export async function listComments(database: Database, sheetId: string) {
  return database.db
    .select({
      id: comments.id,
      revision: comments.revision,
      anchor: comments.anchor,
      body: comments.body,
      authorName: users.name,
      createdAt: comments.createdAt,
    })
    .from(comments)
    .leftJoin(users, eq(users.id, comments.authorId))
    .where(eq(comments.sheetId, sheetId))
    .orderBy(asc(comments.createdAt));
}

/** Adds a comment on one revision of a sheet. */
export async function addComment(
  database: Database,
  input: { sheetId: string; revision: number; authorId: string; body: string; anchor?: string },
): Promise<{ id: string }> {
  const [row] = await database.write((db) =>
    db
      .insert(comments)
      .values({ sheetId: input.sheetId, revision: input.revision, authorId: input.authorId, body: input.body, anchor: input.anchor ?? null })
      .returning({ id: comments.id }),
  );
  return row;
}

/** Every review of a sheet, newest first, with the reviewer's name. */
export async function listReviews(database: Database, sheetId: string) {
  return database.db
    .select({
      id: reviews.id,
      revision: reviews.revision,
      verdict: reviews.verdict,
      body: reviews.body,
      reviewerName: users.name,
      createdAt: reviews.createdAt,
    })
    .from(reviews)
    .leftJoin(users, eq(users.id, reviews.reviewerId))
    .where(eq(reviews.sheetId, sheetId))
    .orderBy(desc(reviews.createdAt));
}

/**
 * Records a verdict on one revision; a verdict on the latest revision also sets the sheet's
 * status, so an approval never silently covers revisions saved after it.
 */
export async function submitReview(
  database: Database,
  input: { sheetId: string; revision: number; reviewerId: string; verdict: Verdict; body: string },
): Promise<{ id: string; status: string }> {
  return database.transaction(async (tx) => {
    const [row] = await tx
      .insert(reviews)
      .values({ sheetId: input.sheetId, revision: input.revision, reviewerId: input.reviewerId, verdict: input.verdict, body: input.body })
      .returning({ id: reviews.id });
    const [sheet] = await tx
      .update(sheets)
      .set({ status: sql`CASE WHEN ${sheets.latestRevision} = ${input.revision} THEN ${input.verdict} ELSE ${sheets.status} END` })
      .where(eq(sheets.id, input.sheetId))
      .returning({ status: sheets.status });
    return { id: row.id, status: sheet.status };
  });
}
