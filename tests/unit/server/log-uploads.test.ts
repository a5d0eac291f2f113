import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync as nodeGzipSync } from 'node:zlib';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { uploads } from '../../../src/db/schema';
import type { Identity } from '../../../src/lib/server/access';
import { getDatabase } from '../../../src/lib/server/database';
import { diskLogStorage, type LogStorage } from '../../../src/lib/server/log-storage';
import { deleteLogUpload, getLogUpload, PREVIEW_ROWS, storeLogUpload } from '../../../src/lib/server/log-uploads';
import { MAX_LOG_BYTES } from '../../../src/lib/validation/log-uploads';
import * as logsRoute from '../../../src/pages/api/sheets/[sheetId]/logs/index';
import * as logRoute from '../../../src/pages/api/sheets/[sheetId]/logs/[logId]';
import { addTestMember, callRoute, demoIdentity, demoTeamId } from '../../helpers/api-context';
import { createTestSheet } from '../../helpers/test-sheets';
import { identityForUser } from '../../../src/lib/server/identity';
import { chunkedStream } from '../../helpers/streams';

const encoder = new TextEncoder();

/** Node's gzip as plain bytes. */
const gzipSync = (data: string | Uint8Array) => new Uint8Array(nodeGzipSync(data));

/** A controller log of the invented Tarnwhistle parcel line: time, object position and one roll joint's rates. */
function tarnwhistleLog(rows: number): string {
  const lines = ['t,px,py,pz,left_roll_cmd'];
  for (let i = 0; i < rows; i++) lines.push(`${(i * 0.002).toFixed(3)},0.${i % 10},0.05,0.12,${(0.5 + i * 1e-4).toFixed(4)}`);
  return `${lines.join('\n')}\n`;
}


/** Every file under `folder`, relative, including half-written `.part` files. */
function filesUnder(folder: string): string[] {
  return existsSync(folder) ? readdirSync(folder, { recursive: true, withFileTypes: true }).filter((entry) => entry.isFile()).map((entry) => entry.name) : [];
}

let sheet: { id: string; teamId: string };
let reviewer: Identity;

async function rowsOfSheet(sheetId: string) {
  const database = await getDatabase();
  return database.db.select().from(uploads).where(eq(uploads.sheetId, sheetId));
}

beforeAll(async () => {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  const { sheetId } = await createTestSheet(database, teamId, 'Log upload test sheet');
  sheet = { id: sheetId, teamId };
  reviewer = await demoIdentity('reviewer');
});

describe('log upload service (disk storage)', () => {
  let folder: string;
  let storage: LogStorage;

  async function upload(body: Uint8Array | ReadableStream<Uint8Array>, { limit = MAX_LOG_BYTES, fileName = 'run.csv', declaredLength = null as string | null } = {}) {
    const database = await getDatabase();
    return storeLogUpload(database, storage, {
      sheet,
      fileName,
      body: body instanceof Uint8Array ? chunkedStream(body) : body,
      declaredLength,
      limit,
      actor: { userId: reviewer.user.id },
    });
  }

  beforeAll(() => {
    folder = mkdtempSync(join(tmpdir(), 'slipless-log-disk-'));
    storage = diskLogStorage(folder);
  });

  it('stores a CSV log streamed in and records its size and SHA-256 (FIPS 180-2 example: "abc")', async () => {
    // "abc" is a one-column CSV header; its digest is the worked example of FIPS 180-2, appendix B.1.
    const stored = await upload(encoder.encode('abc'));
    expect(stored.ok).toBe(true);
    if (!stored.ok) return;
    expect(stored.value).toMatchObject({ contentType: 'text/csv', byteSize: 3, sha256: 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad', fileName: 'run.csv' });
    const [row] = (await rowsOfSheet(sheet.id)).filter((r) => r.id === stored.value.id);
    expect(readFileSync(join(folder, row.storageKey), 'utf8')).toBe('abc');
  });

  it('hashes and stores a log of many chunks exactly as sent (second route: one-shot SHA-256 of the whole file)', async () => {
    const bytes = encoder.encode(tarnwhistleLog(40_000));
    expect(bytes.length).toBeGreaterThan(1024 * 1024);
    const stored = await upload(chunkedStream(bytes, { chunkSize: 7_919 }));
    if (!stored.ok) throw new Error(stored.error.message);
    expect(stored.value.byteSize).toBe(bytes.length);
    expect(stored.value.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    const [row] = (await rowsOfSheet(sheet.id)).filter((r) => r.id === stored.value.id);
    expect(new Uint8Array(readFileSync(join(folder, row.storageKey)))).toEqual(bytes);
  });

  it('tells gzip by its magic number, whatever the name, and previews the decompressed rows', async () => {
    const text = tarnwhistleLog(50);
    // RFC 1952: a gzip member starts 1f 8b; Node's zlib is the independent compressor here.
    const stored = await upload(gzipSync(text), { fileName: 'run-7.csv' });
    if (!stored.ok) throw new Error(stored.error.message);
    expect(stored.value.contentType).toBe('application/gzip');
    const detail = await getLogUpload(await getDatabase(), storage, sheet.id, stored.value.id);
    if (!detail.ok) throw new Error(detail.error.message);
    const [header, ...rows] = text.trim().split('\n').map((line) => line.split(','));
    expect(detail.value.preview.header).toEqual(header);
    expect(detail.value.preview.rows).toEqual(rows.slice(0, PREVIEW_ROWS));
  });

  it('stores a plain CSV named .gz as CSV text', async () => {
    const stored = await upload(encoder.encode(tarnwhistleLog(3)), { fileName: 'run.csv.gz' });
    expect(stored.ok && stored.value.contentType).toBe('text/csv');
  });

  it.each([
    // PNG signature, from the PNG specification (ISO/IEC 15948, section 5.2).
    ['a PNG image', Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13])],
    // ZIP local file header signature "PK\3\4" (PKWARE APPNOTE, section 4.3.7): a spreadsheet, not a CSV.
    ['a zip archive', Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 0x0a])],
    ['gzip of binary data', gzipSync(Uint8Array.from([0, 1, 2, 3, 0x0a, 4, 5]))],
    ['bytes that start like gzip but are not', Uint8Array.from([0x1f, 0x8b, 0xff, 0xff, 0xff, 0xff, 0x0a])],
    ['text that is not UTF-8', Uint8Array.from([0x74, 0xff, 0xfe, 0x2c, 0x70, 0x0a])],
    ['an empty file', new Uint8Array()],
    ['a blank first line', encoder.encode('\n1,2,3\n')],
  ])('refuses %s, naming the body, and keeps no row and no file', async (_what, bytes) => {
    const before = (await rowsOfSheet(sheet.id)).length;
    const filesBefore = filesUnder(folder).length;
    const refused = await upload(bytes);
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.error).toMatchObject({ kind: 'invalid', path: '(body)' });
    expect((await rowsOfSheet(sheet.id)).length).toBe(before);
    expect(filesUnder(folder).length).toBe(filesBefore);
  });

  it('refuses a log past the limit while it streams (no Content-Length), keeping no row and no file', async () => {
    const before = (await rowsOfSheet(sheet.id)).length;
    const filesBefore = filesUnder(folder).length;
    const refused = await upload(chunkedStream(encoder.encode(tarnwhistleLog(2_000)), { chunkSize: 1024 }), { limit: 8 * 1024 });
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.error.kind).toBe('too-large');
    expect(refused.error.message).toContain('8 KiB');
    expect((await rowsOfSheet(sheet.id)).length).toBe(before);
    expect(filesUnder(folder).length).toBe(filesBefore);
  });

  it('refuses a declared Content-Length past the limit before reading any of the body', async () => {
    let pulls = 0;
    // A high-water mark of 0 makes the stream pull only when someone reads.
    const body = new ReadableStream<Uint8Array>(
      {
        pull(controller) {
          pulls += 1;
          controller.close();
        },
      },
      { highWaterMark: 0 },
    );
    const refused = await upload(body, { limit: 1024, declaredLength: '1025' });
    expect(refused.ok || refused.error.kind).toBe('too-large');
    expect(pulls).toBe(0);
  });

  it('keeps no row and no file (not even a .part) when the client breaks off mid-upload', async () => {
    const before = (await rowsOfSheet(sheet.id)).length;
    const filesBefore = filesUnder(folder).length;
    const bytes = encoder.encode(tarnwhistleLog(20_000));
    const refused = await upload(chunkedStream(bytes, { failAfter: 200 * 1024 }));
    expect(refused.ok).toBe(false);
    if (refused.ok) return;
    expect(refused.error).toMatchObject({ kind: 'invalid', path: '(body)' });
    expect((await rowsOfSheet(sheet.id)).length).toBe(before);
    expect(filesUnder(folder).length).toBe(filesBefore);
  });

  it('deletes a log: its row and its file, after which it is not found by its id', async () => {
    const database = await getDatabase();
    const stored = await upload(encoder.encode(tarnwhistleLog(5)));
    if (!stored.ok) throw new Error(stored.error.message);
    const filesBefore = filesUnder(folder).length;
    expect((await deleteLogUpload(database, storage, sheet.id, stored.value.id, { userId: reviewer.user.id })).ok).toBe(true);
    expect(filesUnder(folder).length).toBe(filesBefore - 1);
    const gone = await getLogUpload(database, storage, sheet.id, stored.value.id);
    expect(gone.ok || gone.error).toMatchObject({ kind: 'not-found', path: 'logId' });
  });
});

describe('log routes', () => {
  const logFolder = process.env.LOG_STORAGE_DIR!;

  function post(identity: Identity | null, body: Uint8Array | ReadableStream<Uint8Array>, query = '?fileName=run-12.csv', headers: Record<string, string> = {}) {
    return callRoute(logsRoute.POST, { method: 'POST', path: `/api/sheets/${sheet.id}/logs${query}`, params: { sheetId: sheet.id }, body, identity, headers });
  }

  it('uploads for a reviewer (201), lists for a viewer, previews, and deletes for the reviewer (204)', async () => {
    const viewer = await demoIdentity('viewer');
    const created = await post(reviewer, encoder.encode(tarnwhistleLog(30)));
    expect(created.status).toBe(201);
    const { id } = (await created.json()) as { id: string };
    const list = await callRoute(logsRoute.GET, { path: `/api/sheets/${sheet.id}/logs`, params: { sheetId: sheet.id }, identity: viewer });
    expect(((await list.json()) as { items: { id: string }[] }).items.map((item) => item.id)).toContain(id);
    const one = await callRoute(logRoute.GET, { path: `/api/sheets/${sheet.id}/logs/${id}`, params: { sheetId: sheet.id, logId: id }, identity: viewer });
    expect(one.status).toBe(200);
    expect(((await one.json()) as { preview: { header: string[] } }).preview.header).toEqual(['t', 'px', 'py', 'pz', 'left_roll_cmd']);
    const byViewer = await callRoute(logRoute.DELETE, { method: 'DELETE', path: `/api/sheets/${sheet.id}/logs/${id}`, params: { sheetId: sheet.id, logId: id }, identity: viewer });
    expect(byViewer.status).toBe(403);
    const byReviewer = await callRoute(logRoute.DELETE, { method: 'DELETE', path: `/api/sheets/${sheet.id}/logs/${id}`, params: { sheetId: sheet.id, logId: id }, identity: reviewer });
    expect(byReviewer.status).toBe(204);
  });

  it('refuses an upload by a viewer (403) and by another team (404) without storing anything', async () => {
    const filesBefore = filesUnder(logFolder).length;
    const rowsBefore = (await rowsOfSheet(sheet.id)).length;
    const viewer = await demoIdentity('viewer');
    expect((await post(viewer, encoder.encode(tarnwhistleLog(3)))).status).toBe(403);
    const outsider = await addTestMember('owner');
    const other = (await identityForUser(await getDatabase(), outsider.userId, Date.now()))!;
    expect((await post(other, encoder.encode(tarnwhistleLog(3)))).status).toBe(404);
    const otherList = await callRoute(logsRoute.GET, { path: `/api/sheets/${sheet.id}/logs`, params: { sheetId: sheet.id }, identity: other });
    expect(otherList.status).toBe(404);
    expect(filesUnder(logFolder).length).toBe(filesBefore);
    expect((await rowsOfSheet(sheet.id)).length).toBe(rowsBefore);
  });

  it('names the field of each refusal: the file name in the query, the body for what it holds', async () => {
    const noName = await post(reviewer, encoder.encode(tarnwhistleLog(3)), '');
    expect(noName.status).toBe(400);
    expect(((await noName.json()) as { error: { path: string } }).error.path).toBe('fileName');
    const folderName = await post(reviewer, encoder.encode(tarnwhistleLog(3)), '?fileName=..%2Fsecrets.csv');
    expect(((await folderName.json()) as { error: { path: string } }).error.path).toBe('fileName');
    const binary = await post(reviewer, Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    expect(binary.status).toBe(400);
    expect(((await binary.json()) as { error: { path: string } }).error.path).toBe('(body)');
    const missing = await callRoute(logRoute.GET, { path: `/api/sheets/${sheet.id}/logs/nope`, params: { sheetId: sheet.id, logId: 'nope' }, identity: reviewer });
    expect(missing.status).toBe(404);
    expect(((await missing.json()) as { error: { path: string } }).error.path).toBe('logId');
  });

  it('refuses a declared size one byte past 500 MiB (the route uses MAX_LOG_BYTES), before reading the body', async () => {
    // 500 MiB = 500 × 2^20 bytes (IEC 80000-13 binary prefix).
    expect(MAX_LOG_BYTES).toBe(500 * 2 ** 20);
    const refused = await post(reviewer, encoder.encode(tarnwhistleLog(3)), '?fileName=big.csv', { 'content-length': String(MAX_LOG_BYTES + 1) });
    expect(refused.status).toBe(413);
    expect(((await refused.json()) as { error: { message: string } }).error.message).toContain('500 MiB');
    const atLimit = await post(reviewer, encoder.encode(tarnwhistleLog(3)), '?fileName=at-limit.csv', { 'content-length': String(MAX_LOG_BYTES) });
    expect(atLimit.status).toBe(201);
  });
});
