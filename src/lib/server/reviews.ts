import { and, asc, desc, eq } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Database } from '../../db';
import { comments, reviews, sheetRevisions, users } from '../../db/schema';
import type { ReviewState, SheetComment, SheetReview, Verdict } from '../contract';
import { fail, succeed, type Result } from '../result';
import { insertAudit } from './audit';
import { renderRemark } from './remark-html';
import { sendMail } from './email';
import { findReviewState, type Actor } from './sheets';
import { revisionLabel } from '../view/revision';

const resolvers = alias(users, 'resolvers');

/**
 * Every remark on a sheet, oldest first, with its author's name, where its thread stands and
 * whether `reader` may resolve it (a checker, or the author of the revision it is on).
 */
export async function listComments(database: Database, sheetId: string, reader: { userId: string; mayCheck: boolean }): Promise<SheetComment[]> {
  const rows = await database.db
    .select({
      id: comments.id,
      revision: comments.revision,
      anchor: comments.anchor,
      parentId: comments.parentId,
      body: comments.body,
      authorName: users.name,
      createdAt: comments.createdAt,
      resolvedAt: comments.resolvedAt,
      resolvedByName: resolvers.name,
      revisionAuthorId: sheetRevisions.authorId,
    })
    .from(comments)
    .leftJoin(users, eq(users.id, comments.authorId))
    .leftJoin(resolvers, eq(resolvers.id, comments.resolvedById))
    .leftJoin(sheetRevisions, and(eq(sheetRevisions.sheetId, comments.sheetId), eq(sheetRevisions.number, comments.revision)))
    .where(eq(comments.sheetId, sheetId))
    .orderBy(asc(comments.createdAt));
  return rows.map(({ revisionAuthorId, ...row }) => ({
    ...row,
    html: renderRemark(row.body),
    canResolve: row.parentId === null && (reader.mayCheck || revisionAuthorId === reader.userId),
  }));
}

/**
 * Adds a remark on one revision of a sheet and its audit event, in one transaction. A reply joins
 * the thread of the remark it answers, on that remark's revision and anchor, so a thread never
 * spans revisions; replies to replies join the same thread.
 */
export async function addComment(
  database: Database,
  input: { sheet: { id: string; teamId: string }; revision: number; body: string; anchor?: string; parentId?: string; actor: Actor & { userId: string } },
): Promise<Result<{ id: string }>> {
  const { sheet, actor } = input;
  return database.transaction(async (tx) => {
    let revision = input.revision;
    let anchor = input.anchor ?? null;
    let parentId: string | null = null;
    if (input.parentId) {
      const [parent] = await tx
        .select({ id: comments.id, parentId: comments.parentId, revision: comments.revision, anchor: comments.anchor })
        .from(comments)
        .where(and(eq(comments.id, input.parentId), eq(comments.sheetId, sheet.id)));
      if (!parent) return fail({ kind: 'invalid', message: 'The remark this replies to does not exist on this sheet.', path: 'parentId' });
      parentId = parent.parentId ?? parent.id;
      revision = parent.revision;
      anchor = parent.anchor;
    }
    const [row] = await tx
      .insert(comments)
      .values({ sheetId: sheet.id, revision, authorId: actor.userId, body: input.body, anchor, parentId })
      .returning({ id: comments.id });
    await insertAudit(tx, { teamId: sheet.teamId, actorId: actor.userId, action: 'sheet.comment', subject: sheet.id, detail: { revision, remark: row.id, parentId }, address: actor.address });
    return succeed(row);
  });
}

/**
 * Marks a remark thread resolved, or open again. Only the author of the revision it is on or a
 * checker (`mayCheck`) may; a reply is resolved with its thread, so the thread's opening remark is named.
 */
export async function resolveRemark(
  database: Database,
  input: { sheet: { id: string; teamId: string }; id: string; resolved: boolean; mayCheck: boolean; actor: Actor & { userId: string } },
): Promise<Result<{ id: string; resolved: boolean }>> {
  const { sheet, actor } = input;
  return database.transaction(async (tx) => {
    const [remark] = await tx
      .select({ id: comments.id, parentId: comments.parentId, revisionAuthorId: sheetRevisions.authorId })
      .from(comments)
      .leftJoin(sheetRevisions, and(eq(sheetRevisions.sheetId, comments.sheetId), eq(sheetRevisions.number, comments.revision)))
      .where(and(eq(comments.id, input.id), eq(comments.sheetId, sheet.id)));
    if (!remark) return fail({ kind: 'not-found', message: 'No such remark on this sheet.', path: 'id' });
    if (remark.parentId) return fail({ kind: 'invalid', message: "Resolve a thread by its opening remark, not by a reply.", path: 'id' });
    if (!input.mayCheck && remark.revisionAuthorId !== actor.userId) {
      return fail({ kind: 'forbidden', message: "Only the revision's author or a checker may resolve or reopen a remark.", path: 'id' });
    }
    await tx
      .update(comments)
      .set(input.resolved ? { resolvedAt: new Date(), resolvedById: actor.userId } : { resolvedAt: null, resolvedById: null })
      .where(eq(comments.id, remark.id));
    await insertAudit(tx, { teamId: sheet.teamId, actorId: actor.userId, action: 'sheet.remark_resolve', subject: sheet.id, detail: { remark: remark.id, resolved: input.resolved }, address: actor.address });
    return succeed({ id: remark.id, resolved: input.resolved });
  });
}

/** Every signature on a sheet, newest first, with the checker's name. */
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

/** The e-mail telling a revision's author that a checker signed it as checked or returned it. */
export function signatureMail(input: { sheetTitle: string; revision: number; verdict: Verdict; checkerName: string; note: string; link: string | null }): { subject: string; text: string } {
  const { sheetTitle, revision, verdict, checkerName, note, link } = input;
  const headline =
    verdict === 'checked'
      ? `${checkerName} signed revision ${revision} of "${sheetTitle}" as checked.`
      : `${checkerName} returned revision ${revision} of "${sheetTitle}" for correction.`;
  return {
    subject: verdict === 'checked' ? `Checked: ${sheetTitle}, ${revisionLabel(revision)}` : `Returned for correction: ${sheetTitle}, ${revisionLabel(revision)}`,
    text: [headline, ...(note ? ['', `${checkerName} wrote:`, '', note] : []), ...(link ? ['', `Open the sheet: ${link}`] : [])].join('\n'),
  };
}

/**
 * Signs one revision as checked or returns it, makes that the revision's checking state and writes
 * the audit event, in one transaction; then mails the revision's author (not when the checker is
 * the author). The answer is the sheet's state (its latest revision's), so a signature on an older
 * revision never reads as covering newer ones.
 */
export async function submitReview(
  database: Database,
  input: { sheet: { id: string; teamId: string; title: string }; revision: number; verdict: Verdict; body: string; origin?: string; actor: Actor & { userId: string } },
): Promise<{ id: string; status: ReviewState }> {
  const { sheet, actor } = input;
  const signed = await database.transaction(async (tx) => {
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
      action: input.verdict === 'checked' ? 'sheet.check' : 'sheet.return',
      subject: sheet.id,
      detail: { revision: input.revision },
      address: actor.address,
    });
    const state = await findReviewState(tx, sheet.id);
    return { id: row.id, status: state?.reviewState ?? 'draft' };
  });
  // The signature stands even when the mail cannot go out; the failure is logged for the operator.
  await mailRevisionAuthor(database, input).catch((error: unknown) => console.error('signature mail not sent:', error));
  return signed;
}

async function mailRevisionAuthor(
  database: Database,
  input: { sheet: { id: string; title: string }; revision: number; verdict: Verdict; body: string; origin?: string; actor: { userId: string } },
): Promise<void> {
  const [author] = await database.db
    .select({ id: users.id, email: users.email })
    .from(sheetRevisions)
    .innerJoin(users, eq(users.id, sheetRevisions.authorId))
    .where(and(eq(sheetRevisions.sheetId, input.sheet.id), eq(sheetRevisions.number, input.revision)));
  if (!author?.email || author.id === input.actor.userId) return;
  const [checker] = await database.db.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, input.actor.userId));
  const link = input.origin ? `${input.origin.replace(/\/+$/, '')}/sheets/${input.sheet.id}?revision=${input.revision}` : null;
  await sendMail({
    to: author.email,
    ...signatureMail({ sheetTitle: input.sheet.title, revision: input.revision, verdict: input.verdict, checkerName: checker?.name ?? checker?.email ?? 'A checker', note: input.body, link }),
  });
}
