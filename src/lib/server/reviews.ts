import { and, asc, desc, eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { comments, reviews, sheetRevisions, users } from '../../db/schema';
import type { ReviewState, SheetComment, SheetReview, Verdict } from '../contract';
import { findReviewState } from './sheets';

/** Every comment on a sheet, oldest first, with its author's name. */
export async function listComments(database: Database, sheetId: string): Promise<SheetComment[]> {
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
export async function listReviews(database: Database, sheetId: string): Promise<SheetReview[]> {
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
 * Records a verdict on one revision and makes it that revision's review state; the answer is the
 * sheet's state (its latest revision's), so a verdict on an older revision never reads as covering newer ones.
 */
export async function submitReview(
  database: Database,
  input: { sheetId: string; revision: number; reviewerId: string; verdict: Verdict; body: string },
): Promise<{ id: string; status: ReviewState }> {
  return database.transaction(async (tx) => {
    const [row] = await tx
      .insert(reviews)
      .values({ sheetId: input.sheetId, revision: input.revision, reviewerId: input.reviewerId, verdict: input.verdict, body: input.body })
      .returning({ id: reviews.id });
    await tx
      .update(sheetRevisions)
      .set({ reviewState: input.verdict })
      .where(and(eq(sheetRevisions.sheetId, input.sheetId), eq(sheetRevisions.number, input.revision)));
    const state = await findReviewState(tx, input.sheetId);
    return { id: row.id, status: state?.reviewState ?? 'draft' };
  });
}
