/**
 * Comparisons of a stored controller log with a sheet revision: the mapping is checked by the
 * engine's schema, the log is streamed from storage (decompressed when gzip) through compareLog,
 * and the outcome is stored tied to the revision it was judged against. The mapping is kept with
 * the log's header, so the team is offered it again for a log with the same columns.
 */
import { PassThrough, Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { and, desc, eq, sql } from 'drizzle-orm';
import Papa from 'papaparse';
import type { Database } from '../../db';
import { logComparisons, uploads, users } from '../../db/schema';
import type { LogComparisonList, LogComparisonRecord, SheetComparisonList } from '../contract/log-comparisons';
import { compareLog, type LogComparison } from '../logs/compare';
import { parseLogMapping } from '../logs/mapping';
import { fail, succeed, type Result } from '../result';
import { SAFETY_CSV_COMMENT } from '../safety';
import { comparedSampleHeader, comparedSampleLine } from '../sheet/results-csv';
import { DEFAULT_COMMANDED, parseSheet } from '../sheet/schema';
import { notFound } from './access';
import { insertAudit } from './audit';
import type { LogStorage } from './log-storage';
import { findLogRow, readLogPreview } from './log-uploads';
import { getRevision } from './sheets';

/** Recent comparisons of the team searched for a mapping of a log with the same header. */
const SAVED_MAPPING_SEARCH = 200;

/** What the comparison row keeps in its column map: the mapping as sent and the header of the log it was used for. */
interface StoredColumnMap {
  header: string[];
  mapping: unknown;
}

export interface RunComparisonRequest {
  sheet: { id: string; teamId: string; latestRevision: number };
  uploadId: string;
  /** The mapping as sent: untrusted. */
  mapping: unknown;
  /** The sheet revision to judge against; the latest when absent. */
  revision?: number;
  actor: { userId: string; address?: string | null };
}

const recordColumns = {
  id: logComparisons.id,
  uploadId: logComparisons.uploadId,
  sheetId: logComparisons.sheetId,
  revision: logComparisons.revision,
  columnMap: logComparisons.columnMap,
  status: logComparisons.status,
  verdict: logComparisons.verdict,
  result: logComparisons.result,
  createdByName: users.name,
  createdAt: logComparisons.createdAt,
};

type RecordRow = { columnMap: unknown; result: unknown } & Omit<LogComparisonRecord, 'mapping' | 'result'>;

const asRecord = ({ columnMap, result, ...row }: RecordRow): LogComparisonRecord => ({
  ...row,
  mapping: (columnMap as StoredColumnMap).mapping,
  result: (result as LogComparison | null) ?? null,
});

const noSuchComparison = () => notFound('This log has no such comparison.', 'comparisonId');

/** The stored log as UTF-8 text, decompressed when it is gzip (strictly: a corrupt gzip fails the stream). */
async function logText(storage: LogStorage, storageKey: string, contentType: string): Promise<Readable> {
  const stored = await storage.get(storageKey);
  const text = contentType === 'application/gzip' ? stored.pipe(createGunzip()) : stored;
  if (text !== stored) {
    stored.on('error', (error) => text.destroy(error));
    // A reader that stops early (a bad line) destroys the text; the file under it must close too, not wait for the collector.
    text.on('close', () => stored.destroy());
  }
  text.setEncoding('utf8');
  return text;
}

/**
 * Compares one of a sheet's logs with the sheet at a revision and stores the outcome. Invalid
 * (naming `mapping.<field>`) for a mapping the schema refuses or one naming joints the sheet lacks,
 * not-found for a missing log or revision, unprocessable with the engine's located issues (line,
 * column, expected, found) for a bad log; nothing is stored for any of these.
 */
export async function runLogComparison(database: Database, storage: LogStorage, request: RunComparisonRequest): Promise<Result<LogComparisonRecord>> {
  const { sheet, uploadId, actor } = request;
  const read = parseLogMapping(request.mapping);
  if (!read.ok) return fail({ kind: 'invalid', message: `${read.issues[0]!.path}: ${read.issues[0]!.message}`, path: `mapping.${read.issues[0]!.path}`, issues: read.issues });
  const log = await findLogRow(database, sheet.id, uploadId);
  if (!log) return notFound('This sheet has no such log.', 'logId');
  const revisionNumber = request.revision ?? sheet.latestRevision;
  const revision = await getRevision(database, sheet.id, revisionNumber);
  if (!revision) return notFound(`The sheet has no revision ${revisionNumber}.`, 'revision');
  const parsed = parseSheet(revision.inputs);
  if (!parsed.ok) return fail({ kind: 'unprocessable', message: `Revision ${revisionNumber} of the sheet does not read as a sheet document.`, path: 'revision' });
  const { header } = await readLogPreview(storage, log.storageKey, log.summary.contentType);
  let compared: Awaited<ReturnType<typeof compareLog>>;
  const text = await logText(storage, log.storageKey, log.summary.contentType);
  try {
    compared = await compareLog(parsed.doc, read.mapping, text);
  } catch {
    return fail({ kind: 'unprocessable', message: 'The stored log could not be read to its end (a damaged gzip file?).', path: 'logId' });
  } finally {
    text.destroy();
  }
  if (!compared.ok) {
    const { stage, issues, message } = compared.error;
    if (stage === 'mapping') {
      const first = issues[0];
      return fail({ kind: 'invalid', message, path: first && 'path' in first ? `mapping.${first.path}` : 'mapping', issues });
    }
    return fail({ kind: 'unprocessable', message, path: 'logId', issues });
  }
  const comparison = compared.value;
  const columnMap: StoredColumnMap = { header, mapping: request.mapping };
  const id = crypto.randomUUID();
  await database.transaction(async (tx) => {
    await tx.insert(logComparisons).values({
      id,
      uploadId,
      sheetId: sheet.id,
      revision: revisionNumber,
      columnMap,
      status: 'done',
      verdict: comparison.verdict.withinTolerance ? 'pass' : 'fail',
      result: comparison,
      createdBy: actor.userId,
    });
    await insertAudit(tx, {
      teamId: sheet.teamId,
      actorId: actor.userId,
      action: 'log.compare',
      subject: sheet.id,
      detail: { uploadId, comparisonId: id, revision: revisionNumber, withinTolerance: comparison.verdict.withinTolerance },
      address: actor.address,
    });
  });
  return getLogComparison(database, sheet.id, uploadId, id);
}

/** The comparisons of a sheet (of one of its logs when `uploadId` is given), newest first. */
export async function listLogComparisons(database: Database, sheetId: string, uploadId?: string): Promise<LogComparisonRecord[]> {
  const rows = await database.db
    .select(recordColumns)
    .from(logComparisons)
    .leftJoin(users, eq(users.id, logComparisons.createdBy))
    .where(uploadId === undefined ? eq(logComparisons.sheetId, sheetId) : and(eq(logComparisons.sheetId, sheetId), eq(logComparisons.uploadId, uploadId)))
    .orderBy(desc(logComparisons.createdAt), desc(logComparisons.id));
  return rows.map(asRecord);
}

/** A sheet's comparisons of all its logs, newest first, without their results (the list a sheet shows), with the sheet's latest revision. */
export async function listSheetComparisons(database: Database, sheet: { id: string; latestRevision: number }): Promise<SheetComparisonList> {
  const items = await database.db
    .select({
      id: logComparisons.id,
      uploadId: logComparisons.uploadId,
      fileName: uploads.fileName,
      revision: logComparisons.revision,
      status: logComparisons.status,
      verdict: logComparisons.verdict,
      createdByName: users.name,
      createdAt: logComparisons.createdAt,
    })
    .from(logComparisons)
    .innerJoin(uploads, eq(uploads.id, logComparisons.uploadId))
    .leftJoin(users, eq(users.id, logComparisons.createdBy))
    .where(eq(logComparisons.sheetId, sheet.id))
    .orderBy(desc(logComparisons.createdAt), desc(logComparisons.id));
  return { latestRevision: sheet.latestRevision, items };
}

/** A log's latest comparison with a revision, for the report: the result without its plot series. */
export interface RevisionLogComparison {
  id: string;
  uploadId: string;
  fileName: string;
  createdByName: string | null;
  createdAt: Date;
  result: Omit<LogComparison, 'series'>;
}

/** Per log of the sheet, its newest comparison with `revision` (logs never compared with it are left out), in file-name order. */
export async function latestComparisonsOfRevision(database: Database, sheetId: string, revision: number): Promise<RevisionLogComparison[]> {
  const rows = await database.db
    .select({
      id: logComparisons.id,
      uploadId: logComparisons.uploadId,
      fileName: uploads.fileName,
      createdByName: users.name,
      createdAt: logComparisons.createdAt,
      // The plot series are most of a stored result; the report's tables do not need them.
      result: sql<string | null>`json_remove(${logComparisons.result}, '$.series')`,
    })
    .from(logComparisons)
    .innerJoin(uploads, eq(uploads.id, logComparisons.uploadId))
    .leftJoin(users, eq(users.id, logComparisons.createdBy))
    .where(and(eq(logComparisons.sheetId, sheetId), eq(logComparisons.revision, revision), eq(logComparisons.status, 'done')))
    .orderBy(desc(logComparisons.createdAt), desc(logComparisons.id));
  const latest = new Map<string, RevisionLogComparison>();
  for (const { result, ...row } of rows) {
    if (result === null || latest.has(row.uploadId)) continue;
    latest.set(row.uploadId, { ...row, result: JSON.parse(result) as Omit<LogComparison, 'series'> });
  }
  return [...latest.values()].sort((a, b) => a.fileName.localeCompare(b.fileName) || a.uploadId.localeCompare(b.uploadId));
}

/** One comparison of one of a sheet's logs; not-found (naming `comparisonId`) otherwise. */
export async function getLogComparison(database: Database, sheetId: string, uploadId: string, comparisonId: string): Promise<Result<LogComparisonRecord>> {
  const [row] = await database.db
    .select(recordColumns)
    .from(logComparisons)
    .leftJoin(users, eq(users.id, logComparisons.createdBy))
    .where(and(eq(logComparisons.sheetId, sheetId), eq(logComparisons.uploadId, uploadId), eq(logComparisons.id, comparisonId)));
  return row ? succeed(asRecord(row)) : noSuchComparison();
}

/** The mapping the team last used for a log whose header equals `header` cell for cell, or null. */
export async function savedMappingFor(database: Database, teamId: string, header: readonly string[]): Promise<unknown> {
  const rows = await database.db
    .select({ columnMap: logComparisons.columnMap })
    .from(logComparisons)
    .innerJoin(uploads, eq(uploads.id, logComparisons.uploadId))
    .where(eq(uploads.teamId, teamId))
    .orderBy(desc(logComparisons.createdAt), desc(logComparisons.id))
    .limit(SAVED_MAPPING_SEARCH);
  const same = rows.find(({ columnMap }) => {
    const stored = (columnMap as StoredColumnMap).header;
    return stored.length === header.length && stored.every((name, i) => name === header[i]);
  });
  return same ? (same.columnMap as StoredColumnMap).mapping : null;
}

/** A log's comparisons and the team's saved mapping for its header; not-found (naming `logId`) for a log of another sheet or none. */
export async function listComparisonsOfLog(database: Database, storage: LogStorage, sheetId: string, uploadId: string): Promise<Result<LogComparisonList>> {
  const log = await findLogRow(database, sheetId, uploadId);
  if (!log) return notFound('This sheet has no such log.', 'logId');
  const { header } = await readLogPreview(storage, log.storageKey, log.summary.contentType);
  const [items, savedMapping] = await Promise.all([listLogComparisons(database, sheetId, uploadId), savedMappingFor(database, log.teamId, header)]);
  return succeed({ items, savedMapping });
}

/** Column names of the statistics export, one row per compared joint, then one per contact. */
export const COMPARISON_CSV_COLUMNS = ['kind', 'name', 'finger', 'samples', 'rms', 'max', 'max_at_s', 'within_fraction', 'unit', 'note'] as const;

/** The per-joint (rate residual, rad/s) and per-contact (slip speed, m/s) statistics of a comparison as CSV text, after the safety caution as a comment line. */
export function comparisonStatisticsCsv(comparison: LogComparison): string {
  const rows: (string | number | null)[][] = [
    // Which solution the sheet's rates followed; a comparison stored before the choice followed steer-and-roll.
    ...comparison.joints.map((j) => ['joint', j.joint, j.finger, j.samples, j.rms, j.max, j.maxAt, j.withinFraction, 'rad/s', `sheet rates: ${comparison.solution ?? DEFAULT_COMMANDED}`]),
    ...comparison.contacts.map((c) => ['contact', c.finger, c.finger, c.samples, c.rms, c.max, c.maxAt, c.withinFraction, 'm/s', c.computed ? '' : (c.reason ?? 'not computed')]),
  ];
  return `${SAFETY_CSV_COMMENT}\n${Papa.unparse({ fields: [...COMPARISON_CSV_COLUMNS], data: rows.map((row) => row.map((cell) => (typeof cell === 'number' && !Number.isFinite(cell) ? '' : cell))) }, { newline: '\n', escapeFormulae: true })}\n`;
}

/**
 * The per-sample table of a stored comparison as a CSV byte stream (header: comparedSampleHeader).
 * The stored result keeps only decimated series, so the log is read again and compared with the
 * revision and mapping the comparison was run with: the rows are the samples its statistics
 * summarise. Reading pauses while the download is behind, so memory stays bounded however long
 * the log; a cancelled download stops the reading. Not-found (naming `comparisonId` or `logId`)
 * as getLogComparison; a comparison that cannot be re-read is unprocessable.
 */
export async function comparisonSeriesCsv(database: Database, storage: LogStorage, sheetId: string, uploadId: string, comparisonId: string): Promise<Result<{ fileName: string; body: ReadableStream<Uint8Array> }>> {
  const found = await getLogComparison(database, sheetId, uploadId, comparisonId);
  if (!found.ok) return found;
  const record = found.value;
  const log = await findLogRow(database, sheetId, uploadId);
  if (!log) return notFound('This sheet has no such log.', 'logId');
  const revision = await getRevision(database, sheetId, record.revision);
  const parsed = revision ? parseSheet(revision.inputs) : null;
  const read = parseLogMapping(record.mapping);
  if (!parsed?.ok || !read.ok) return fail({ kind: 'unprocessable', message: `The comparison's revision ${record.revision} or mapping no longer reads.`, path: 'comparisonId' });
  const source = await logText(storage, log.storageKey, log.summary.contentType);
  const output = new PassThrough();
  const write = (text: string) => {
    if (!output.write(text)) source.pause();
  };
  output.on('drain', () => source.resume());
  output.on('close', () => source.destroy());
  compareLog(parsed.doc, read.mapping, source, {
    // The file carries commanded joint rates: the safety caution comes first, as a comment line.
    onColumns: (columns) => write(`${SAFETY_CSV_COMMENT}\n${comparedSampleHeader(columns)}`),
    onSample: (sample) => write(comparedSampleLine(sample)),
  }).then(
    // The same log, revision and mapping compared once already; a failure now (storage gone) can only cut the download short.
    (compared) => (compared.ok ? output.end() : output.destroy(new Error(compared.error.message))),
    (error: unknown) => output.destroy(error instanceof Error ? error : new Error(String(error))),
  ).finally(() => source.destroy());
  return succeed({
    fileName: `comparison-r${record.revision}-${record.id.slice(0, 8)}-series.csv`,
    body: Readable.toWeb(output) as ReadableStream<Uint8Array>,
  });
}
