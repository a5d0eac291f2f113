import { randomUUID } from 'node:crypto';
import { existsSync, mkdirSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { beforeAll, describe, expect, it } from 'vitest';
import { getDatabase } from '../../../src/lib/server/database';
import { diskLogStorage, type LogStorage } from '../../../src/lib/server/log-storage';
import { ORPHAN_GRACE_MS, startLogSweeper, sweepOrphanedLogs } from '../../../src/lib/server/log-sweeper';
import { storeLogUpload } from '../../../src/lib/server/log-uploads';
import { MAX_LOG_BYTES } from '../../../src/lib/validation/log-uploads';
import { demoIdentity, demoTeamId } from '../../helpers/api-context';
import { chunkedStream } from '../../helpers/streams';
import { makeTempDir } from '../../helpers/temp';
import { createTestSheet } from '../../helpers/test-sheets';

const MINUTE_MS = 60_000;
const LOG = new TextEncoder().encode('t,px\n0.000,0.10\n0.001,0.11\n');

let sheet: { id: string; teamId: string };
let uploaderId: string;

beforeAll(async () => {
  const teamId = await demoTeamId();
  const { sheetId } = await createTestSheet(await getDatabase(), teamId, 'Log sweeper test sheet');
  sheet = { id: sheetId, teamId };
  uploaderId = (await demoIdentity('reviewer')).user.id;
});

/** A log stored through the upload service: bytes and row. */
async function referencedLog(storage: LogStorage): Promise<string> {
  const stored = await storeLogUpload(await getDatabase(), storage, {
    sheet,
    fileName: 'kept.csv',
    body: chunkedStream(LOG),
    declaredLength: null,
    limit: MAX_LOG_BYTES,
    actor: { userId: uploaderId },
  });
  if (!stored.ok) throw new Error(stored.error.message);
  return `${sheet.teamId}/${stored.value.id}`;
}

/** Bytes stored under a fresh upload key with no row, as a crash between the two leaves them. */
async function orphanedLog(storage: LogStorage): Promise<string> {
  const key = `${sheet.teamId}/${randomUUID()}`;
  await storage.put(key, Readable.from([LOG]));
  return key;
}

async function keys(storage: LogStorage): Promise<string[]> {
  const listed: string[] = [];
  for await (const { key } of storage.list()) listed.push(key);
  return listed.sort();
}

/** Sets a stored file's modification time `ageMs` into the past. */
function age(folder: string, key: string, ageMs: number, suffix = ''): void {
  const when = new Date(Date.now() - ageMs);
  utimesSync(join(folder, `${key}${suffix}`), when, when);
}

describe('log sweeper on disk storage', () => {
  it('lists stored logs with their times, and half-written ones under their key', async () => {
    const folder = makeTempDir('slipless-sweep-');
    const storage = diskLogStorage(folder);
    expect(await keys(diskLogStorage(join(folder, 'not-made-yet')))).toEqual([]);
    const kept = await referencedLog(storage);
    const partial = `${sheet.teamId}/${randomUUID()}`;
    writeFileSync(join(folder, `${partial}.part`), 't,px\n0.0');
    expect(await keys(storage)).toEqual([kept, partial].sort());
    for await (const { modifiedAt } of storage.list()) expect(Math.abs(modifiedAt.getTime() - Date.now())).toBeLessThan(MINUTE_MS);
  });

  it('deletes an orphan older than the grace period, keeps a fresh orphan, a referenced log and files it did not make', async () => {
    const folder = makeTempDir('slipless-sweep-');
    const storage = diskLogStorage(folder);
    const kept = await referencedLog(storage);
    const oldOrphan = await orphanedLog(storage);
    const freshOrphan = await orphanedLog(storage);
    const abandoned = `${sheet.teamId}/${randomUUID()}`;
    writeFileSync(join(folder, `${abandoned}.part`), 't,px\n0.0');
    mkdirSync(join(folder, 'backups'));
    writeFileSync(join(folder, 'backups', 'notes'), 'not a log');
    age(folder, kept, 3 * ORPHAN_GRACE_MS);
    age(folder, oldOrphan, ORPHAN_GRACE_MS + MINUTE_MS);
    age(folder, abandoned, 2 * ORPHAN_GRACE_MS, '.part');
    age(folder, 'backups/notes', 3 * ORPHAN_GRACE_MS);
    age(folder, freshOrphan, ORPHAN_GRACE_MS - 10 * MINUTE_MS);

    const outcome = await sweepOrphanedLogs(await getDatabase(), storage);
    expect(outcome.deleted.sort()).toEqual([oldOrphan, abandoned].sort());
    expect(outcome.examined).toBe(3);
    expect(await keys(storage)).toEqual([kept, freshOrphan, 'backups/notes'].sort());
    expect(existsSync(join(folder, `${abandoned}.part`))).toBe(false);
  });

  it('sweeps once at start when started, reporting what it removed, and again on its timer', async () => {
    const folder = makeTempDir('slipless-sweep-');
    const storage = diskLogStorage(folder);
    const first = await orphanedLog(storage);
    age(folder, first, 2 * ORPHAN_GRACE_MS);
    const lines: string[] = [];
    const sweeper = startLogSweeper(await getDatabase(), storage, { intervalMs: 50, report: (line) => lines.push(line) });
    try {
      await sweeper.firstSweep;
      expect(await keys(storage)).toEqual([]);
      expect(lines).toEqual([expect.stringMatching(/removed 1 stored controller log file/)]);
      const second = await orphanedLog(storage);
      age(folder, second, 2 * ORPHAN_GRACE_MS);
      await expect.poll(() => keys(storage), { timeout: 5_000 }).toEqual([]);
    } finally {
      sweeper.stop();
    }
  });

  it('reports a failing sweep instead of throwing', async () => {
    const broken: LogStorage = {
      ...diskLogStorage(makeTempDir('slipless-sweep-')),
      list: () => ({
        [Symbol.asyncIterator]: () => ({ next: () => Promise.reject(new Error('storage unreachable')) }),
      }),
    };
    const lines: string[] = [];
    const sweeper = startLogSweeper(await getDatabase(), broken, { report: (line) => lines.push(line) });
    sweeper.stop();
    await sweeper.firstSweep;
    expect(lines).toEqual([expect.stringMatching(/failed and will be retried: storage unreachable/)]);
  });
});
