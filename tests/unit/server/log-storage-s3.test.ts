import { createHash, randomUUID } from 'node:crypto';
import { Readable } from 'node:stream';
import { gzipSync } from 'node:zlib';
import { buffer } from 'node:stream/consumers';
import { ListObjectsV2Command, S3Client } from '@aws-sdk/client-s3';
import S3rver from 's3rver';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getDatabase } from '../../../src/lib/server/database';
import { s3LogStorage, s3SettingsFrom, type LogStorage, type S3Settings } from '../../../src/lib/server/log-storage';
import { ORPHAN_GRACE_MS, sweepOrphanedLogs } from '../../../src/lib/server/log-sweeper';
import { deleteLogUpload, getLogUpload, storeLogUpload } from '../../../src/lib/server/log-uploads';
import { MAX_LOG_BYTES } from '../../../src/lib/validation/log-uploads';
import { demoIdentity, demoTeamId } from '../../helpers/api-context';
import { chunkedStream } from '../../helpers/streams';
import { freePort, makeTempDir } from '../../helpers/temp';
import { createTestSheet } from '../../helpers/test-sheets';

/*
 * The S3 path against s3rver, a local fake S3 server from npm, started here on a free loopback
 * port with its data in a temp folder. Its fixed credentials are S3RVER / S3RVER (s3rver README).
 */

const BUCKET = 'tarnwhistle-controller-logs';
const MIB = 1024 * 1024;
/** Bodies arrive in 256 KiB pieces, so a multipart upload sees many reads per 5 MiB part. */
const S3_CHUNKS = { chunkSize: 256 * 1024 };

let server: S3rver;
let settings: S3Settings;
let storage: LogStorage;
let inspector: S3Client;
let sheet: { id: string; teamId: string };
let uploaderId: string;

/** A Tarnwhistle parcel-line log of about `bytes` bytes: time, object position and a roll rate. */
function tarnwhistleLog(bytes: number): Uint8Array {
  const lines = ['t,px,py,pz,right_roll_cmd'];
  let size = lines[0].length + 1;
  for (let i = 0; size < bytes; i++) {
    const line = `${(i * 0.001).toFixed(3)},0.${i % 10}1,0.052,0.118,${(0.25 + (i % 100) * 1e-3).toFixed(3)}`;
    lines.push(line);
    size += line.length + 1;
  }
  return new TextEncoder().encode(`${lines.join('\n')}\n`);
}

async function objectKeys(): Promise<string[]> {
  const listed = await inspector.send(new ListObjectsV2Command({ Bucket: BUCKET }));
  return (listed.Contents ?? []).map((object) => object.Key!);
}

async function readAll(stream: Readable): Promise<Uint8Array> {
  return new Uint8Array(await buffer(stream));
}

async function upload(body: ReadableStream<Uint8Array>, limit = MAX_LOG_BYTES) {
  return storeLogUpload(await getDatabase(), storage, { sheet, fileName: 'right-hand.csv', body, declaredLength: null, limit, actor: { userId: uploaderId } });
}

beforeAll(async () => {
  const port = await freePort();
  server = new S3rver({ address: '127.0.0.1', port, silent: true, directory: makeTempDir('slipless-s3rver-'), configureBuckets: [{ name: BUCKET }] });
  await server.run();
  settings = s3SettingsFrom({ endpoint: `http://127.0.0.1:${port}`, bucket: BUCKET, region: 'eu-west-1', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' })!;
  storage = s3LogStorage(settings);
  inspector = new S3Client({ endpoint: settings.endpoint, region: settings.region, forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } });
  const teamId = await demoTeamId();
  const { sheetId } = await createTestSheet(await getDatabase(), teamId, 'S3 log storage test sheet');
  sheet = { id: sheetId, teamId };
  uploaderId = (await demoIdentity('reviewer')).user.id;
}, 60_000);

afterAll(async () => {
  inspector?.destroy();
  await server?.close();
});

describe('log storage on S3 (s3rver)', () => {
  it('round-trips a 12 MiB log put in several multipart parts, byte for byte', async () => {
    // 12 MiB > the SDK's 5 MiB part size, so the upload goes in three parts (AWS S3 docs: parts are 5 MiB to 5 GiB).
    const bytes = tarnwhistleLog(12 * MIB);
    await storage.put('demo-team/round-trip', Readable.from([bytes.subarray(0, 5 * MIB), bytes.subarray(5 * MIB)]));
    const back = await readAll(await storage.get('demo-team/round-trip'));
    expect(createHash('sha256').update(back).digest('hex')).toBe(createHash('sha256').update(bytes).digest('hex'));
    await storage.delete('demo-team/round-trip');
    expect(await objectKeys()).not.toContain('demo-team/round-trip');
    await expect(storage.get('demo-team/round-trip')).rejects.toThrow();
  }, 60_000);

  it('stores a gzip log through the upload service, previews it decompressed, and deletes row and object', async () => {
    const text = 't,px\n0.000,0.10\n0.001,0.11\n';
    const stored = await upload(chunkedStream(new Uint8Array(gzipSync(text)), S3_CHUNKS));
    if (!stored.ok) throw new Error(stored.error.message);
    expect(stored.value.contentType).toBe('application/gzip');
    expect(await objectKeys()).toContain(`${sheet.teamId}/${stored.value.id}`);
    const database = await getDatabase();
    const detail = await getLogUpload(database, storage, sheet.id, stored.value.id);
    expect(detail.ok && detail.value.preview).toEqual({ header: ['t', 'px'], rows: [['0.000', '0.10'], ['0.001', '0.11']] });
    expect((await deleteLogUpload(database, storage, sheet.id, stored.value.id, { userId: uploaderId })).ok).toBe(true);
    expect(await objectKeys()).not.toContain(`${sheet.teamId}/${stored.value.id}`);
  });

  it('leaves no object when the client breaks off after two parts were sent', async () => {
    const before = await objectKeys();
    const refused = await upload(chunkedStream(tarnwhistleLog(14 * MIB), { ...S3_CHUNKS, failAfter: 11 * MIB }));
    expect(refused.ok).toBe(false);
    expect(await objectKeys()).toEqual(before);
  }, 60_000);

  it('leaves no object for an over-size log or a refused file type', async () => {
    const before = await objectKeys();
    const tooLarge = await upload(chunkedStream(tarnwhistleLog(6 * MIB), S3_CHUNKS), 5.5 * MIB);
    expect(tooLarge.ok || tooLarge.error.kind).toBe('too-large');
    // PNG signature (ISO/IEC 15948, section 5.2): not a CSV.
    const png = await upload(chunkedStream(Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), S3_CHUNKS));
    expect(png.ok || png.error.kind).toBe('invalid');
    expect(await objectKeys()).toEqual(before);
  }, 60_000);
});

describe('orphan sweep on S3 (s3rver)', () => {
  const MINUTE_MS = 60_000;

  async function listed(): Promise<Map<string, Date>> {
    const found = new Map<string, Date>();
    for await (const { key, modifiedAt } of storage.list()) found.set(key, modifiedAt);
    return found;
  }

  it('lists every object in the bucket with the time S3 gives it', async () => {
    const keys = Array.from({ length: 3 }, () => `${sheet.teamId}/${randomUUID()}`);
    for (const key of keys) await storage.put(key, Readable.from([tarnwhistleLog(1024)]));
    const found = await listed();
    for (const key of keys) {
      expect(found.has(key)).toBe(true);
      expect(Math.abs(found.get(key)!.getTime() - Date.now())).toBeLessThan(5 * MINUTE_MS);
    }
    expect([...found.keys()].sort()).toEqual((await objectKeys()).sort());
    for (const key of keys) await storage.delete(key);
  });

  it('deletes an object no upload row refers to only once it is older than the grace period, and keeps a referenced log', async () => {
    const stored = await upload(chunkedStream(tarnwhistleLog(4096), S3_CHUNKS));
    if (!stored.ok) throw new Error(stored.error.message);
    const kept = `${sheet.teamId}/${stored.value.id}`;
    const orphan = `${sheet.teamId}/${randomUUID()}`;
    await storage.put(orphan, Readable.from([tarnwhistleLog(4096)]));
    const database = await getDatabase();
    // S3 sets LastModified itself, so the sweep's clock is moved instead of the objects' times.
    const fresh = await sweepOrphanedLogs(database, storage, { now: Date.now() + ORPHAN_GRACE_MS - 10 * MINUTE_MS });
    expect(fresh.deleted).toEqual([]);
    expect(await objectKeys()).toEqual(expect.arrayContaining([kept, orphan]));
    const later = await sweepOrphanedLogs(database, storage, { now: Date.now() + ORPHAN_GRACE_MS + 10 * MINUTE_MS });
    expect(later.deleted).toEqual([orphan]);
    const left = await objectKeys();
    expect(left).toContain(kept);
    expect(left).not.toContain(orphan);
    expect((await deleteLogUpload(database, storage, sheet.id, stored.value.id, { userId: uploaderId })).ok).toBe(true);
  });
});

describe('S3 settings', () => {
  it('choose the disk without S3_ENDPOINT and name every missing S3 setting with it', () => {
    expect(s3SettingsFrom({ bucket: BUCKET })).toBeNull();
    expect(() => s3SettingsFrom({ endpoint: 'http://127.0.0.1:9000', accessKeyId: 'key' })).toThrow(/S3_BUCKET, S3_SECRET_ACCESS_KEY/);
  });
});
