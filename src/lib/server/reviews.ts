import { and, asc, desc, eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { comments, reviews, sheetRevisions, users } from '../../db/schema';
import type { ReviewState, SheetComment, SheetReview, Verdict } from '../contract';
import { insertAudit } from './audit';
import { findReviewState, type Actor } from './sheets';

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

/** Adds a comment on one revision of a sheet and its audit event, in one transaction. */
export async function addComment(
  database: Database,
  input: { sheet: { id: string; teamId: string }; revision: number; body: string; anchor?: string; actor: Actor & { userId: string } },
): Promise<{ id: string }> {
  const { sheet, actor } = input;
  return database.transaction(async (tx) => {
    const [row] = await tx
      .insert(comments)
      .values({ sheetId: sheet.id, revision: input.revision, authorId: actor.userId, body: input.body, anchor: input.anchor ?? null })
      .returning({ id: comments.id });
    await insertAudit(tx, { teamId: sheet.teamId, actorId: actor.userId, action: 'sheet.comment', subject: sheet.id, detail: { revision: input.revision }, address: actor.address });
    return row;
  });
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
 * Records a verdict on one revision, makes it that revision's review state and writes the audit
 * event, in one transaction; the answer is the sheet's state (its latest revision's), so a verdict
 * on an older revision never reads as covering newer ones.
 */
export async function submitReview(
  database: Database,
  input: { sheet: { id: string; teamId: string }; revision: number; verdict: Verdict; body: string; actor: Actor & { userId: string } },
): Promise<{ id: string; status: ReviewState }> {
  const { sheet, actor } = input;
  return database.transaction(async (tx) => {
    const [row] = await tx
      .insert(reviews)
      .values({ sheetId: sheet.id, revision: input.revision, reviewerId: actor.userId, verdict: input.verdict, body: input.body })
      .returning({ id: reviews.id });
    await tx
      .update(sheetRevisions)
      .set({ reviewState: input.verdict })
      .where(and(eq(sheetRevisions.sheetId, sheet.id), eq(sheetRevisions.number, input.revision)));
    await insertAudit(tx, {
      teamId: sheet.teamId,
      actorId: actor.userId,
      action: input.verdict === 'approved' ? 'sheet.approve' : 'sheet.request_changes',
      subject: sheet.id,
      detail: { revision: input.revision },
      address: actor.address,
    });
    const state = await findReviewState(tx, sheet.id);
    return { id: row.id, status: state?.reviewState ?? 'draft' };
  });
}
