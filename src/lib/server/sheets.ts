import { and, asc, count, desc, eq, getTableColumns, isNull, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Database, DrizzleDb, Transaction } from '../../db';
import type { CreatedSheet, LatestRevision, RevisionPage, SheetListPage } from '../contract';
import { fail, succeed, type DomainError, type Result } from '../result';
import { sheetRevisions, sheets, users, type ReviewState } from '../../db/schema';
import { evaluateSheet } from '../sheet/evaluate';
import { appMetrics } from './observability';
import type { SheetSummary, StoredDocument } from '../sheet/summary';
import type { SheetDocument } from '../sheet/types';
import type { ListRevisionsQuery, ListSheetsQuery } from '../validation/sheets';
import { insertAudit } from './audit';
import { preparedPerConnection } from './prepared';
import { documentIssues } from './http';
import { readSheetFile } from './sheet-files';

export type { SheetSummary };

/** Who does it and from where, for the audit trail. */
export interface Actor {
  /** Null for the system (seeding, scripts). */
  userId: string | null;
  address?: string | null;
}

type Checked = { doc: SheetDocument; summary: SheetSummary; stored: StoredDocument };

const isStoredDocument = (value: unknown): value is StoredDocument => value !== null && typeof value === 'object' && !Array.isArray(value);

/** The raw document validated with its summary: every stored revision passes through here, and is stored exactly as sent. */
export function checkDocument(raw: unknown): Result<Checked> {
  const stopTimer = appMetrics().solveSeconds.startTimer();
  const evaluated = evaluateSheet(raw);
  stopTimer();
  if (!evaluated.ok) return fail(documentIssues(evaluated.error.issues));
  // A document that validates is an object; the guard only tells the compiler.
  if (!isStoredDocument(raw)) return fail({ kind: 'invalid', message: 'A sheet document is one JSON object.', path: 'document' });
  return succeed({ doc: evaluated.value.doc, summary: evaluated.value.summary, stored: raw });
}

/**
 * How a new sheet is named. A title or tags given when a sheet is created, imported or forked
 * name the new sheet only; the stored document is kept as sent, and from the first save on the
 * sheet's title and tags are read from its latest document alone.
 */
interface Naming {
  title?: string;
  tags?: string[];
}

/** Inserts a sheet and its first revision, named by `naming` or else by the checked document. */
async function insertSheet(
  tx: Transaction,
  input: { teamId: string; checked: Checked; naming: Naming; authorId: string | null; message: string; forkedFrom?: { sheetId: string; revision: number } },
): Promise<CreatedSheet> {
  const [sheet] = await tx
    .insert(sheets)
    .values({
      teamId: input.teamId,
      title: input.naming.title ?? input.checked.doc.title,
      tags: input.naming.tags ?? input.checked.doc.tags,
      latestRevision: 1,
      createdBy: input.authorId,
      forkedFromSheetId: input.forkedFrom?.sheetId ?? null,
      forkedFromRevision: input.forkedFrom?.revision ?? null,
    })
    .returning({ id: sheets.id });
  await tx.insert(sheetRevisions).values({
    sheetId: sheet.id,
    number: 1,
    inputs: input.checked.stored,
    summary: input.checked.summary,
    message: input.message,
    authorId: input.authorId,
  });
  return { sheetId: sheet.id, revision: 1, summary: input.checked.summary };
}

/** Creates a sheet from a raw document: validated, summarised, stored at revision 1 and audited in one transaction. */
export async function createSheet(
  database: Database,
  input: { teamId: string; document: unknown; actor: Actor; title?: string; tags?: string[]; message?: string },
): Promise<Result<CreatedSheet>> {
  const checked = checkDocument(input.document);
  if (!checked.ok) return checked;
  return succeed(
    await database.transaction(async (tx) => {
      const created = await insertSheet(tx, {
        teamId: input.teamId,
        checked: checked.value,
        naming: { title: input.title, tags: input.tags },
        authorId: input.actor.userId,
        message: input.message ?? 'Created',
      });
      await insertAudit(tx, { teamId: input.teamId, actorId: input.actor.userId, action: 'sheet.create', subject: created.sheetId, address: input.actor.address });
      return created;
    }),
  );
}

/**
 * Creates a sheet from the text of an uploaded sheet file, every problem located in the file
 * (JSON syntax by line and column, document issues by field); an explicit title names the sheet.
 */
export async function importSheet(
  database: Database,
  input: { teamId: string; fileName: string; content: string; actor: Actor; title?: string },
): Promise<Result<CreatedSheet>> {
  const file = readSheetFile(input.content);
  if (!file.ok) {
    const [first] = file.issues;
    const where = first.path ? `${first.path}: ` : '';
    return fail({
      kind: 'invalid',
      message: file.stage === 'document' ? `${input.fileName} is not a valid sheet: ${where}${first.message}` : `${input.fileName}: ${first.message}`,
      path: first.path ? `content.${first.path}` : 'content',
      stage: file.stage,
      issues: file.issues,
    });
  }
  // Reading the file validated and summarised the document already.
  const checked: Checked = { doc: file.doc, summary: file.summary, stored: file.document };
  return succeed(
    await database.transaction(async (tx) => {
      const created = await insertSheet(tx, { teamId: input.teamId, checked, naming: { title: input.title }, authorId: input.actor.userId, message: `Imported from ${input.fileName}` });
      await insertAudit(tx, {
        teamId: input.teamId,
        actorId: input.actor.userId,
        action: 'sheet.import',
        subject: created.sheetId,
        detail: { fileName: input.fileName },
        address: input.actor.address,
      });
      return created;
    }),
  );
}

export type StaleSave = DomainError & { kind: 'stale'; latestRevision: number; latest: LatestRevision };

/**
 * Appends a revision on top of `baseRevision`, as a draft awaiting review, with the sheet's title
 * and tags from the document and the audit event, in one transaction. A save based on anything
 * but the latest revision is refused as stale so that no one's work is silently overwritten.
 */
export async function saveRevision(
  database: Database,
  input: { sheetId: string; baseRevision: number; document: unknown; message?: string; actor: Actor },
): Promise<Result<{ revision: number; summary: SheetSummary }, DomainError | StaleSave>> {
  const checked = checkDocument(input.document);
  if (!checked.ok) return checked;
  const { doc, summary, stored } = checked.value;
  const number = input.baseRevision + 1;
  return database.transaction(async (tx): Promise<Result<{ revision: number; summary: SheetSummary }, DomainError | StaleSave>> => {
    // Claims the next number only while the base is still the latest: one statement checks and moves the sheet on, and the queue's transaction keeps the check and the insert together.
    const [moved] = await tx
      .update(sheets)
      .set({ latestRevision: number, title: doc.title, tags: doc.tags, updatedAt: sql`(unixepoch('subsec') * 1000)` })
      .where(and(eq(sheets.id, input.sheetId), isNull(sheets.deletedAt), eq(sheets.latestRevision, input.baseRevision)))
      .returning({ teamId: sheets.teamId });
    if (!moved) return refuseSave(tx, input);
    await tx.insert(sheetRevisions).values({
      sheetId: input.sheetId,
      number,
      parentRevision: input.baseRevision,
      inputs: stored,
      summary,
      message: input.message ?? '',
      authorId: input.actor.userId,
    });
    await insertAudit(tx, { teamId: moved.teamId, actorId: input.actor.userId, action: 'sheet.save', subject: input.sheetId, detail: { revision: number }, address: input.actor.address });
    return succeed({ revision: number, summary });
  });
}

/** Why a save did not move its sheet on: the sheet is missing or deleted, or a later revision was saved (stale, with that revision so the editor can rebase). */
async function refuseSave(tx: Transaction, input: { sheetId: string; baseRevision: number }): Promise<Result<never, DomainError | StaleSave>> {
  const [sheet] = await tx
    .select({ latest: sheets.latestRevision })
    .from(sheets)
    .where(and(eq(sheets.id, input.sheetId), isNull(sheets.deletedAt)));
  if (!sheet) return fail({ kind: 'not-found', message: 'Not found.' });
  const [latest] = await tx
    .select({ number: sheetRevisions.number, inputs: sheetRevisions.inputs, message: sheetRevisions.message, authorName: users.name })
    .from(sheetRevisions)
    .leftJoin(users, eq(users.id, sheetRevisions.authorId))
    .where(and(eq(sheetRevisions.sheetId, input.sheetId), eq(sheetRevisions.number, sheet.latest)));
  return fail({
    kind: 'stale',
    message: `Revision ${sheet.latest} was saved after the revision ${input.baseRevision} you started from. Nothing was overwritten: reload, or save your version as a fork.`,
    path: 'baseRevision',
    latestRevision: sheet.latest,
    latest,
  });
}

/** Marks a sheet deleted and writes the audit event in the same transaction; its revisions stay in the database for the audit trail. */
export async function deleteSheet(database: Database, sheetId: string, actor: Actor): Promise<void> {
  await database.transaction(async (tx) => {
    const [sheet] = await tx.update(sheets).set({ deletedAt: new Date() }).where(eq(sheets.id, sheetId)).returning({ teamId: sheets.teamId, title: sheets.title });
    if (!sheet) return;
    await insertAudit(tx, { teamId: sheet.teamId, actorId: actor.userId, action: 'sheet.delete', subject: sheetId, detail: { title: sheet.title }, address: actor.address });
  });
}

/** The review state of a sheet's latest revision: review state belongs to revisions, and a sheet shows its latest one's. */
const latestReviewState = sql<ReviewState>`coalesce((SELECT r.review_state FROM sheet_revisions r WHERE r.sheet_id = "sheets"."id" AND r.number = "sheets"."latest_revision"), 'draft')`;
/** The newest revision of a sheet that stands checked, or null. Names are written out: Drizzle leaves columns unqualified in a one-table select, which a correlated subquery would misread. */
const lastCheckedRevision = sql<number | null>`(SELECT max(r.number) FROM sheet_revisions r WHERE r.sheet_id = "sheets"."id" AND r.review_state = 'checked')`;

/** Where a sheet stands in review: its latest revision's state and the last checked revision. */
export async function findReviewState(db: DrizzleDb | Transaction, sheetId: string) {
  const [row] = await db
    .select({ latestRevision: sheets.latestRevision, reviewState: latestReviewState, lastCheckedRevision })
    .from(sheets)
    .where(eq(sheets.id, sheetId));
  return row ?? null;
}

const findSheetQuery = preparedPerConnection((db: DrizzleDb) =>
  db
    .select({ ...getTableColumns(sheets), reviewState: latestReviewState, lastCheckedRevision })
    .from(sheets)
    .where(and(eq(sheets.id, sql.placeholder('sheetId')), isNull(sheets.deletedAt)))
    .prepare(),
);

/** A live sheet by id with where it stands in review, or null when it does not exist or was deleted. */
export async function findSheet(database: Database, sheetId: string) {
  const [sheet] = await findSheetQuery(database.db).all({ sheetId });
  return sheet ?? null;
}

const revisionQuery = preparedPerConnection((db: DrizzleDb) =>
  db
    .select({ revision: sheetRevisions, authorName: users.name })
    .from(sheetRevisions)
    .leftJoin(users, eq(users.id, sheetRevisions.authorId))
    .where(and(eq(sheetRevisions.sheetId, sql.placeholder('sheetId')), eq(sheetRevisions.number, sql.placeholder('number'))))
    .prepare(),
);

/** One revision of a sheet with its author's name, or null. */
export async function getRevision(database: Database, sheetId: string, number: number) {
  const [row] = await revisionQuery(database.db).all({ sheetId, number });
  return row ? { ...row.revision, authorName: row.authorName } : null;
}

/** One page of a sheet's revisions, newest first, without the inputs; with the total and the next page (null on the last). */
export async function listRevisions(database: Database, sheetId: string, { page, pageSize }: ListRevisionsQuery): Promise<RevisionPage> {
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

/**
 * Copies one revision of a sheet into a new sheet of `targetTeamId` (same or another team) that
 * remembers its origin, audited in both teams when they differ; the copy is named "<title> (fork)"
 * unless a title is given.
 */
export async function forkSheet(
  database: Database,
  input: { source: { id: string; teamId: string; title: string; tags: string[] }; revision: number; actor: Actor; title?: string; targetTeamId?: string },
): Promise<Result<CreatedSheet>> {
  const { source, actor } = input;
  const targetTeamId = input.targetTeamId ?? source.teamId;
  const revision = await getRevision(database, source.id, input.revision);
  if (!revision) return fail({ kind: 'not-found', message: `Revision ${input.revision} does not exist.`, path: 'revision' });
  const checked = checkDocument(revision.inputs);
  if (!checked.ok) return checked;
  return succeed(
    await database.transaction(async (tx) => {
      const created = await insertSheet(tx, {
        teamId: targetTeamId,
        checked: checked.value,
        naming: { title: input.title ?? `${source.title} (fork)`, tags: source.tags },
        authorId: actor.userId,
        message: `Derived from rev ${input.revision}`,
        forkedFrom: { sheetId: source.id, revision: input.revision },
      });
      await insertAudit(tx, [
        { teamId: targetTeamId, actorId: actor.userId, action: 'sheet.fork', subject: created.sheetId, detail: { from: source.id, revision: input.revision }, address: actor.address },
        ...(targetTeamId === source.teamId
          ? []
          : [{ teamId: source.teamId, actorId: actor.userId, action: 'sheet.fork', subject: source.id, detail: { to: created.sheetId, toTeam: targetTeamId, revision: input.revision }, address: actor.address }]),
      ]);
      return created;
    }),
  );
}

// The teams travel as one JSON array, so one statement serves any number of them.
const forksQuery = preparedPerConnection((db: DrizzleDb) =>
  db
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
    .where(
      and(
        eq(sheets.forkedFromSheetId, sql.placeholder('sheetId')),
        sql`${sheets.teamId} IN (SELECT value FROM json_each(${sql.placeholder('teamIds')}))`,
        isNull(sheets.deletedAt),
      ),
    )
    .orderBy(asc(sheets.createdAt))
    .prepare(),
);

/** The live sheets forked from `sheetId` in any of `teamIds` (the teams the caller may read), oldest first. */
export async function listForks(database: Database, sheetId: string, teamIds: readonly string[]) {
  if (teamIds.length === 0) return [];
  return forksQuery(database.db).all({ sheetId, teamIds: JSON.stringify(teamIds) });
}

/** Which optional filters a sheet list has and how it is sorted: one prepared pair of statements each. */
function listShape(query: ListSheetsQuery): string {
  const warnings = query.warnings === 'any' || query.warnings === 'clean' ? query.warnings : 'level';
  return [query.sort, query.q ? 'q' : '', query.author ? 'author' : '', warnings].join(' ');
}

/** The page and the count of a sheet list of one shape (listShape), with placeholders for the values. */
const listQueries = preparedPerConnection((db: DrizzleDb, shape: string) => {
  const [sort, q, author, warnings] = shape.split(' ');
  const latest = db
    .select({ sheetId: sheetRevisions.sheetId, summary: sheetRevisions.summary, number: sheetRevisions.number })
    .from(sheetRevisions)
    .as('latest');
  const filters: SQL[] = [eq(sheets.teamId, sql.placeholder('team')), isNull(sheets.deletedAt)];
  if (q) {
    const pattern = sql.placeholder('pattern');
    filters.push(
      or(sql`${sheets.title} LIKE ${pattern} ESCAPE '\\'`, sql`EXISTS (SELECT 1 FROM json_each(${sheets.tags}) WHERE value LIKE ${pattern} ESCAPE '\\')`)!,
    );
  }
  if (author) filters.push(eq(sheets.createdBy, sql.placeholder('author')));
  if (warnings === 'clean') filters.push(sql`json_extract(${latest.summary}, '$.worst') = 'none'`);
  else if (warnings === 'level') filters.push(sql`json_extract(${latest.summary}, '$.worst') = ${sql.placeholder('warnings')}`);
  const where = and(...filters);
  // The origin's title is shown only when it lives in the same team, so a fork never reveals another team's sheet.
  const origin = alias(sheets, 'origin');
  const order = sort === 'title' ? asc(sheets.title) : sort === 'created' ? desc(sheets.createdAt) : desc(sheets.updatedAt);
  const join = and(eq(latest.sheetId, sheets.id), eq(latest.number, sheets.latestRevision));
  return {
    page: db
      .select({
        id: sheets.id,
        title: sheets.title,
        tags: sheets.tags,
        reviewState: latestReviewState,
        lastCheckedRevision,
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
      .limit(sql.placeholder('limit'))
      .offset(sql.placeholder('offset'))
      .prepare(),
    count: db.select({ total: count() }).from(sheets).leftJoin(latest, join).where(where).prepare(),
  };
});

/** One page of a team's sheets matching the query, with the total count. */
export async function listSheets(database: Database, query: ListSheetsQuery): Promise<SheetListPage> {
  const { page, count: total } = listQueries(database.db, listShape(query));
  const values = {
    team: query.team,
    pattern: query.q ? `%${query.q.replace(/[%_]/g, (c) => `\\${c}`)}%` : null,
    author: query.author ?? null,
    warnings: query.warnings,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  };
  const [rows, [{ total: matching }]] = await Promise.all([page.all(values), total.all(values)]);
  return { items: rows, total: matching, page: query.page, pageSize: query.pageSize };
}
