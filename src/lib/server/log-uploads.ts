import { createHash, randomUUID } from 'node:crypto';
import { Readable, Transform, type TransformCallback } from 'node:stream';
import type { ReadableStream as WebReadableStream } from 'node:stream/web';
import { constants as zlibConstants, createGunzip } from 'node:zlib';
import { and, desc, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import type { Database } from '../../db';
import { uploads, users } from '../../db/schema';
import type { LogContentType, LogPreview, LogUploadDetail, LogUploadSummary } from '../contract/log-uploads';
import { fail, succeed, type Result } from '../result';
import { notFound } from './access';
import { insertAudit } from './audit';
import { BODY_PATH, type BodyFailure } from './http';
import type { LogStorage } from './log-storage';

const KIB = 1024;
const MIB = 1024 * KIB;

/** Bytes of a log's start read to check its header line and to preview it: a header of hundreds of columns fits. */
const HEAD_BYTES = 64 * KIB;

/** Data rows shown under the header in a preview, enough to recognise each column for the mapping form. */
export const PREVIEW_ROWS = 20;

/** gzip's magic number (RFC 1952, section 2.3.1: ID1 = 31, ID2 = 139). */
const GZIP_MAGIC = [0x1f, 0x8b] as const;

/** C0 controls other than tab, line feed and carriage return, and DEL: never part of a CSV header. */
const CONTROL_CHARACTER = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;

export interface UploadActor {
  userId: string;
  address?: string | null;
}

export interface StoreLogRequest {
  sheet: { id: string; teamId: string };
  fileName: string;
  /** The request body; the log's bytes as sent. */
  body: ReadableStream<Uint8Array> | null;
  /** The Content-Length header as sent, if any: a larger declared size is refused before anything is read. */
  declaredLength: string | null;
  /** The most bytes accepted (MAX_LOG_BYTES in the route). */
  limit: number;
  actor: UploadActor;
}

/** A byte count as people read limits: "500 MiB", "64 KiB". */
function formatSize(bytes: number): string {
  return bytes >= MIB ? `${+(bytes / MIB).toFixed(1)} MiB` : `${+(bytes / KIB).toFixed(1)} KiB`;
}

function tooLarge(limit: number, closeConnection: boolean): BodyFailure {
  return { ...fail({ kind: 'too-large', message: `The log is larger than the ${formatSize(limit)} an upload may be.`, path: BODY_PATH }), closeConnection };
}

function refusedLog(message: string): BodyFailure {
  // Part of the body was read, so the connection cannot carry another request.
  return { ...fail({ kind: 'invalid', message, path: BODY_PATH }), closeConnection: true };
}

/** Why the upload stopped; carried through the stream so the storage's failure names it. */
class UploadRefused extends Error {
  constructor(readonly failure: BodyFailure) {
    super(failure.error.message);
  }
}

function isGzip(head: Uint8Array): boolean {
  return head[0] === GZIP_MAGIC[0] && head[1] === GZIP_MAGIC[1];
}

/** `source` decompressed; a gzip cut short yields what it has instead of failing, since previews read only a start. */
function gunzipped(source: Readable): Readable {
  const gunzip = createGunzip({ finishFlush: zlibConstants.Z_SYNC_FLUSH });
  source.on('error', (error) => gunzip.destroy(error));
  gunzip.on('close', () => source.destroy());
  return source.pipe(gunzip);
}

function concatBytes(chunks: readonly Uint8Array[], size: number): Uint8Array {
  const bytes = new Uint8Array(size);
  let offset = 0;
  for (const chunk of chunks) {
    bytes.set(chunk, offset);
    offset += chunk.byteLength;
  }
  return bytes;
}

/** The first `maxBytes` (or fewer, at the end) of `source`, which is then closed; `ended` when the stream had no more. */
async function readStart(source: Readable, maxBytes: number): Promise<{ bytes: Uint8Array; ended: boolean }> {
  const chunks: Uint8Array[] = [];
  let size = 0;
  try {
    for await (const chunk of source as AsyncIterable<Uint8Array>) {
      chunks.push(chunk);
      size += chunk.byteLength;
      if (size >= maxBytes) return { bytes: concatBytes(chunks, size).subarray(0, maxBytes), ended: false };
    }
    return { bytes: concatBytes(chunks, size), ended: true };
  } finally {
    source.destroy();
  }
}

/** The log's text start (decompressed when gzip), at most HEAD_BYTES; throws when gzip data is corrupt. */
async function textStart(head: Uint8Array, headIsWholeFile: boolean): Promise<{ text: Uint8Array; ended: boolean }> {
  if (!isGzip(head)) return { text: head, ended: headIsWholeFile };
  const start = await readStart(gunzipped(Readable.from([head])), HEAD_BYTES);
  return { text: start.bytes, ended: start.ended && headIsWholeFile };
}

/**
 * What is wrong with a log's first line (its column names), or null when it reads as CSV text:
 * UTF-8 (a byte-order mark allowed), no control characters, not empty, within HEAD_BYTES.
 */
function headerLineProblem(text: Uint8Array, ended: boolean): string | null {
  const newline = text.indexOf(0x0a);
  if (newline < 0 && !ended) return `The first line (the column names) is longer than ${formatSize(HEAD_BYTES)}, or the file is not a CSV log.`;
  let line = text.subarray(0, newline < 0 ? text.length : newline);
  if (line.at(-1) === 0x0d) line = line.subarray(0, -1);
  let decoded: string;
  try {
    decoded = new TextDecoder('utf-8', { fatal: true }).decode(line);
  } catch {
    return 'The first line (the column names) is not UTF-8 text: send a CSV file or a gzip-compressed CSV file.';
  }
  if (CONTROL_CHARACTER.test(decoded)) return 'The first line (the column names) holds control characters: send a CSV file or a gzip-compressed CSV file.';
  if (!decoded.trim()) return 'The first line of the log is empty: it must name the columns.';
  return null;
}

/**
 * Passes a log through while counting its bytes against the limit, hashing it and checking its
 * start (gzip or text, a readable header line) once HEAD_BYTES have arrived or the log ended; fails
 * the stream with UploadRefused, so the storage drops what it wrote.
 */
class LogInspector extends Transform {
  byteSize = 0;
  contentType: LogContentType = 'text/csv';
  private readonly hash = createHash('sha256');
  private head: Uint8Array[] = [];
  private headSize = 0;
  private checked = false;

  constructor(private readonly limit: number) {
    super();
  }

  /** The SHA-256 of every byte passed through, hex; once, after the stream ended. */
  sha256(): string {
    return this.hash.digest('hex');
  }

  override _transform(chunk: Uint8Array, _encoding: BufferEncoding, callback: TransformCallback): void {
    this.byteSize += chunk.byteLength;
    if (this.byteSize > this.limit) return callback(new UploadRefused(tooLarge(this.limit, true)));
    this.hash.update(chunk);
    if (this.checked) return callback(null, chunk);
    this.head.push(chunk);
    this.headSize += chunk.byteLength;
    if (this.headSize < HEAD_BYTES) return callback(null, chunk);
    this.checkStart(false).then(() => callback(null, chunk), callback);
  }

  override _flush(callback: TransformCallback): void {
    if (this.checked) return callback();
    this.checkStart(true).then(() => callback(), callback);
  }

  private async checkStart(ended: boolean): Promise<void> {
    this.checked = true;
    const head = concatBytes(this.head, this.headSize);
    this.head = [];
    if (!head.length) throw new UploadRefused(refusedLog('The log is empty: send a CSV file or a gzip-compressed CSV file.'));
    this.contentType = isGzip(head) ? 'application/gzip' : 'text/csv';
    let start: { text: Uint8Array; ended: boolean };
    try {
      start = await textStart(head, ended);
    } catch {
      throw new UploadRefused(refusedLog('The log starts like gzip but does not decompress: send a CSV file or a gzip-compressed CSV file.'));
    }
    const problem = headerLineProblem(start.text, start.ended);
    if (problem) throw new UploadRefused(refusedLog(problem));
  }
}

const summaryColumns = {
  id: uploads.id,
  sheetId: uploads.sheetId,
  fileName: uploads.fileName,
  contentType: uploads.contentType,
  byteSize: uploads.byteSize,
  sha256: uploads.sha256,
  uploaderName: users.name,
  createdAt: uploads.createdAt,
};

type SummaryRow = Omit<LogUploadSummary, 'contentType'> & { contentType: string };

const asSummary = (row: SummaryRow): LogUploadSummary => ({ ...row, contentType: row.contentType as LogContentType });

/**
 * Streams a controller log into `storage` and records it on the sheet. The bytes go to storage
 * first; the row is inserted only after the whole log arrived within the limit and its start
 * read as CSV (or gzip CSV), so an interrupted, refused or over-size upload leaves neither a row
 * nor stored bytes. Storage failures other than those are thrown (a server error).
 */
export async function storeLogUpload(database: Database, storage: LogStorage, request: StoreLogRequest): Promise<Result<LogUploadSummary> | BodyFailure> {
  const { sheet, fileName, limit, actor } = request;
  // Nothing read yet: the server discards the unread upload and the client still gets the answer.
  if (Number(request.declaredLength ?? 0) > limit) return tooLarge(limit, false);
  if (!request.body) return fail({ kind: 'invalid', message: 'Send the log file as the request body.', path: BODY_PATH });
  const id = randomUUID();
  const storageKey = `${sheet.teamId}/${id}`;
  const source = Readable.fromWeb(request.body as WebReadableStream<Uint8Array>);
  const inspector = new LogInspector(limit);
  let interrupted = false;
  // The first failure of the log's stream, kept because the storage may report its own error in its place.
  let streamFailure: unknown;
  inspector.on('error', (error) => (streamFailure ??= error));
  source.on('error', (error) => {
    interrupted = true;
    inspector.destroy(error);
  });
  source.pipe(inspector);
  try {
    await storage.put(storageKey, inspector);
  } catch (error) {
    await storage.delete(storageKey);
    const cause = streamFailure ?? error;
    // A refused log's rest is left unread rather than cancelled: cancelling would reset the socket before the refusal is sent.
    if (cause instanceof UploadRefused) return cause.failure;
    source.destroy();
    if (interrupted) return refusedLog('The upload ended before the whole log arrived; nothing was kept.');
    throw error;
  }
  const row = {
    id,
    teamId: sheet.teamId,
    sheetId: sheet.id,
    uploaderId: actor.userId,
    fileName,
    contentType: inspector.contentType,
    byteSize: inspector.byteSize,
    sha256: inspector.sha256(),
    storageKey,
  };
  try {
    await database.transaction(async (tx) => {
      await tx.insert(uploads).values(row);
      await insertAudit(tx, {
        teamId: sheet.teamId,
        actorId: actor.userId,
        action: 'log.upload',
        subject: sheet.id,
        detail: { uploadId: id, fileName, byteSize: row.byteSize },
        address: actor.address,
      });
    });
  } catch (error) {
    await storage.delete(storageKey);
    throw error;
  }
  const [stored] = await database.db.select(summaryColumns).from(uploads).leftJoin(users, eq(users.id, uploads.uploaderId)).where(eq(uploads.id, id));
  return succeed(asSummary(stored));
}

/** A sheet's logs, newest first. */
export async function listLogUploads(database: Database, sheetId: string): Promise<LogUploadSummary[]> {
  const rows = await database.db
    .select(summaryColumns)
    .from(uploads)
    .leftJoin(users, eq(users.id, uploads.uploaderId))
    .where(eq(uploads.sheetId, sheetId))
    .orderBy(desc(uploads.createdAt), desc(uploads.id));
  return rows.map(asSummary);
}

/** One of a sheet's logs with its team and where its bytes are stored, or null. */
export async function findLogRow(database: Database, sheetId: string, uploadId: string) {
  const [row] = await database.db
    .select({ summary: summaryColumns, storageKey: uploads.storageKey, teamId: uploads.teamId })
    .from(uploads)
    .leftJoin(users, eq(users.id, uploads.uploaderId))
    .where(and(eq(uploads.sheetId, sheetId), eq(uploads.id, uploadId)));
  return row ? { ...row, summary: asSummary(row.summary) } : null;
}

const noSuchLog = () => notFound('This sheet has no such log.', 'logId');

/** The first PREVIEW_ROWS rows under the header of a stored log, decompressed on the fly; reads at most HEAD_BYTES of text. */
export async function readLogPreview(storage: LogStorage, storageKey: string, contentType: LogContentType): Promise<LogPreview> {
  const stored = await storage.get(storageKey);
  const text = contentType === 'application/gzip' ? gunzipped(stored) : stored;
  const start = await readStart(text, HEAD_BYTES);
  let bytes = start.bytes;
  // A line cut by the byte limit is left out rather than shown half.
  if (!start.ended) bytes = bytes.subarray(0, bytes.lastIndexOf(0x0a) + 1);
  const parsed = Papa.parse<string[]>(new TextDecoder().decode(bytes), { preview: PREVIEW_ROWS + 1, skipEmptyLines: true });
  const [header = [], ...rows] = parsed.data;
  return { header, rows };
}

/** One of a sheet's logs with a preview of its first rows; not-found (naming `logId`) for a log of another sheet or none. */
export async function getLogUpload(database: Database, storage: LogStorage, sheetId: string, uploadId: string): Promise<Result<LogUploadDetail>> {
  const row = await findLogRow(database, sheetId, uploadId);
  if (!row) return noSuchLog();
  return succeed({ upload: row.summary, preview: await readLogPreview(storage, row.storageKey, row.summary.contentType) });
}

/** Removes one of a sheet's logs (its comparisons go with it): the row first, so no row ever points at missing bytes. */
export async function deleteLogUpload(database: Database, storage: LogStorage, sheetId: string, uploadId: string, actor: UploadActor): Promise<Result<void>> {
  const row = await findLogRow(database, sheetId, uploadId);
  if (!row) return noSuchLog();
  await database.transaction(async (tx) => {
    await tx.delete(uploads).where(eq(uploads.id, uploadId));
    await insertAudit(tx, {
      teamId: row.teamId,
      actorId: actor.userId,
      action: 'log.delete',
      subject: sheetId,
      detail: { uploadId, fileName: row.summary.fileName },
      address: actor.address,
    });
  });
  await storage.delete(row.storageKey);
  return succeed(undefined);
}
