import { and, asc, count, desc, eq, getTableColumns, inArray, isNull, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Database, DrizzleDb, Transaction } from '../../db';
import { sheetRevisions, sheets, users, type ReviewState } from '../../db/schema';
import { solveSheet } from '../kinematics';
import { parseSheet, type SheetIssue } from '../sheet/schema';
import type { SheetDocument } from '../sheet/types';
import type { ListRevisionsQuery, ListSheetsQuery } from '../validation/sheets';

export interface SheetSummary {
  fingers: number;
  worst: 'none' | 'note' | 'caution' | 'singular';
  warningCodes: string[];
}

/** The stored summary of a revision: finger count and its warnings, computed by the kinematics core. */
export function summarizeSheet(doc: SheetDocument): SheetSummary {
  const result = solveSheet(doc);
  return {
    fingers: doc.hand.fingers.length,
    worst: result.worstSeverity,
    warningCodes: [...new Set(result.warnings.map((w) => w.code))].sort(),
  };
}

export type ValidatedDocument = { ok: true; doc: SheetDocument; summary: SheetSummary } | { ok: false; issues: SheetIssue[] };

/** Validates a sheet document and computes its summary. */
export function validateDocument(input: unknown): ValidatedDocument {
  const parsed = parseSheet(input);
  return parsed.ok ? { ok: true, doc: parsed.doc, summary: summarizeSheet(parsed.doc) } : parsed;
}

export interface NewSheetInput {
  teamId: string;
  title: string;
  tags?: string[];
  inputs: unknown;
  summary?: unknown;
  authorId: string | null;
  message?: string;
  forkedFrom?: { sheetId: string; revision: number };
}

/** Creates a sheet with its first revision in one transaction; resolves only once committed. */
export async function createSheet(database: Database, input: NewSheetInput): Promise<{ sheetId: string; revision: number }> {
  return database.transaction(async (tx) => {
    const [sheet] = await tx
      .insert(sheets)
      .values({
        teamId: input.teamId,
        title: input.title,
        tags: input.tags ?? [],
        latestRevision: 1,
        createdBy: input.authorId,
        forkedFromSheetId: input.forkedFrom?.sheetId ?? null,
        forkedFromRevision: input.forkedFrom?.revision ?? null,
      })
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
  revision: { inputs: unknown; summary?: unknown; message?: string; authorId: string | null; title?: string; tags?: string[] },
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
      .set({
        latestRevision: number,
        updatedAt: sql`(unixepoch('subsec') * 1000)`,
        ...(revision.title ? { title: revision.title } : {}),
        ...(revision.tags ? { tags: revision.tags } : {}),
      })
      .where(eq(sheets.id, sheetId));
    return { status: 'saved', revision: number };
  });
}

/** Marks a sheet deleted; its revisions stay in the database for the audit trail. */
export async function deleteSheet(database: Database, sheetId: string): Promise<void> {
  await database.write((db) => db.update(sheets).set({ deletedAt: new Date() }).where(eq(sheets.id, sheetId)));
}

/** The review state of a sheet's latest revision: review state belongs to revisions, and a sheet shows its latest one's. */
const latestReviewState = sql<ReviewState>`coalesce((SELECT r.review_state FROM sheet_revisions r WHERE r.sheet_id = "sheets"."id" AND r.number = "sheets"."latest_revision"), 'draft')`;
/** The newest revision of a sheet that stands approved, or null. Names are written out: Drizzle leaves columns unqualified in a one-table select, which a correlated subquery would misread. */
const lastApprovedRevision = sql<number | null>`(SELECT max(r.number) FROM sheet_revisions r WHERE r.sheet_id = "sheets"."id" AND r.review_state = 'approved')`;

/** Where a sheet stands in review: its latest revision's state and the last approved revision. */
export async function findReviewState(db: DrizzleDb | Transaction, sheetId: string) {
  const [row] = await db
    .select({ latestRevision: sheets.latestRevision, reviewState: latestReviewState, lastApprovedRevision })
    .from(sheets)
    .where(eq(sheets.id, sheetId));
  return row ?? null;
}

/** A live sheet by id with where it stands in review, or null when it does not exist or was deleted. */
export async function findSheet(database: Database, sheetId: string) {
  const [sheet] = await database.db
    .select({ ...getTableColumns(sheets), reviewState: latestReviewState, lastApprovedRevision })
    .from(sheets)
    .where(and(eq(sheets.id, sheetId), isNull(sheets.deletedAt)));
  return sheet ?? null;
}

/** One revision of a sheet with its author's name, or null. */
export async function getRevision(database: Database, sheetId: string, number: number) {
  const [row] = await database.db
    .select({ revision: sheetRevisions, authorName: users.name })
    .from(sheetRevisions)
    .leftJoin(users, eq(users.id, sheetRevisions.authorId))
    .where(and(eq(sheetRevisions.sheetId, sheetId), eq(sheetRevisions.number, number)));
  return row ? { ...row.revision, authorName: row.authorName } : null;
}

/** One page of a sheet's revisions, newest first, without the inputs; with the total and the next page (null on the last). */
export async function listRevisions(database: Database, sheetId: string, { page, pageSize }: ListRevisionsQuery) {
  const [items, [{ total }]] = await Promise.all([
    database.db
      .select({
        number: sheetRevisions.number,
        parentRevision: sheetRevisions.parentRevision,
        message: sheetRevisions.message,
        summary: sheetRevisions.summary,
        authorId: sheetRevisions.authorId,
        authorName: users.name,
        createdAt: sheetRevisions.createdAt,
      })
      .from(sheetRevisions)
      .leftJoin(users, eq(users.id, sheetRevisions.authorId))
      .where(eq(sheetRevisions.sheetId, sheetId))
      .orderBy(desc(sheetRevisions.number))
      .limit(pageSize)
      .offset((page - 1) * pageSize),
    database.db.select({ total: count() }).from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheetId)),
  ]);
  return { items, total, page, pageSize, nextPage: page * pageSize < total ? page + 1 : null };
}

/** Copies one revision of a sheet into a new sheet of `targetTeamId` (same or another team) that remembers its origin. */
export async function forkSheet(
  database: Database,
  source: { id: string; teamId: string; title: string; tags: string[] },
  revisionNumber: number,
  authorId: string,
  title?: string,
  targetTeamId: string = source.teamId,
): Promise<{ sheetId: string; revision: number } | null> {
  const revision = await getRevision(database, source.id, revisionNumber);
  if (!revision) return null;
  return createSheet(database, {
    teamId: targetTeamId,
    title: title ?? `${source.title} (fork)`,
    tags: source.tags,
    inputs: revision.inputs,
    summary: revision.summary,
    authorId,
    message: `Forked from revision ${revisionNumber}`,
    forkedFrom: { sheetId: source.id, revision: revisionNumber },
  });
}

/** The live sheets forked from `sheetId` in any of `teamIds` (the teams the caller may read), oldest first. */
export async function listForks(database: Database, sheetId: string, teamIds: readonly string[]) {
  if (teamIds.length === 0) return [];
  return database.db
    .select({
      id: sheets.id,
      teamId: sheets.teamId,
      title: sheets.title,
      forkedFromRevision: sheets.forkedFromRevision,
      latestRevision: sheets.latestRevision,
      authorName: users.name,
      createdAt: sheets.createdAt,
    })
    .from(sheets)
    .leftJoin(users, eq(users.id, sheets.createdBy))
    .where(and(eq(sheets.forkedFromSheetId, sheetId), inArray(sheets.teamId, [...teamIds]), isNull(sheets.deletedAt)))
    .orderBy(asc(sheets.createdAt));
}

/** One page of a team's sheets matching the query, with the total count. */
export async function listSheets(database: Database, query: ListSheetsQuery) {
  const latest = database.db
    .select({ sheetId: sheetRevisions.sheetId, summary: sheetRevisions.summary, number: sheetRevisions.number })
    .from(sheetRevisions)
    .as('latest');
  const filters: SQL[] = [eq(sheets.teamId, query.team), isNull(sheets.deletedAt)];
  if (query.q) {
    const pattern = `%${query.q.replace(/[%_]/g, (c) => `\\${c}`)}%`;
    filters.push(
      or(sql`${sheets.title} LIKE ${pattern} ESCAPE '\\'`, sql`EXISTS (SELECT 1 FROM json_each(${sheets.tags}) WHERE value LIKE ${pattern} ESCAPE '\\')`)!,
    );
  }
  if (query.author) filters.push(eq(sheets.createdBy, query.author));
  if (query.warnings === 'clean') filters.push(sql`json_extract(${latest.summary}, '$.worst') = 'none'`);
  else if (query.warnings !== 'any') filters.push(sql`json_extract(${latest.summary}, '$.worst') = ${query.warnings}`);
  const where = and(...filters);
  // The origin's title is shown only when it lives in the same team, so a fork never reveals another team's sheet.
  const origin = alias(sheets, 'origin');
  const order = query.sort === 'title' ? asc(sheets.title) : query.sort === 'created' ? desc(sheets.createdAt) : desc(sheets.updatedAt);
  const join = and(eq(latest.sheetId, sheets.id), eq(latest.number, sheets.latestRevision));

  const [rows, [{ total }]] = await Promise.all([
    database.db
      .select({
        id: sheets.id,
        title: sheets.title,
        tags: sheets.tags,
        reviewState: latestReviewState,
        lastApprovedRevision,
        latestRevision: sheets.latestRevision,
        forkedFromSheetId: sheets.forkedFromSheetId,
        forkedFromRevision: sheets.forkedFromRevision,
        forkedFromTitle: origin.title,
        authorId: sheets.createdBy,
        authorName: users.name,
        updatedAt: sheets.updatedAt,
        summary: latest.summary,
      })
      .from(sheets)
      .leftJoin(latest, join)
      .leftJoin(users, eq(users.id, sheets.createdBy))
      .leftJoin(origin, and(eq(origin.id, sheets.forkedFromSheetId), eq(origin.teamId, sheets.teamId), isNull(origin.deletedAt)))
      .where(where)
      .orderBy(order)
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    database.db.select({ total: count() }).from(sheets).leftJoin(latest, join).where(where),
  ]);
  return { items: rows, total, page: query.page, pageSize: query.pageSize };
}
