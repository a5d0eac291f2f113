import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { createClient } from '@libsql/client';
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { users } from '../../../src/db/schema';
import { createBackup, restoreBackup, tablesInDependencyOrder } from '../../../src/lib/server/backup';
import { prepareDatabase } from '../../../src/lib/server/bootstrap';
import { diskLogStorage, type LogStorage } from '../../../src/lib/server/log-storage-backends';
import { SQLD_AVAILABLE, startSqld, type SqldServer } from '../../helpers/sqld';
import { makeTempDir, tempDatabaseUrl } from '../../helpers/temp';
import { createTestSheet } from '../../helpers/test-sheets';

/** Every table's rows in rowid order, read straight through a client of its own: what "the same database" means here. */
async function dumpDatabase(url: string): Promise<Record<string, Record<string, unknown>[]>> {
  const client = createClient({ url, intMode: 'bigint' });
  try {
    const tables = await client.execute("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
    const dump: Record<string, Record<string, unknown>[]> = {};
    for (const { name } of tables.rows) {
      dump[String(name)] = (await client.execute(`SELECT * FROM "${String(name)}" ORDER BY rowid`)).rows.map((row) => ({ ...row }));
    }
    return dump;
  } finally {
    client.close();
  }
}

/** Stored log keys with a SHA-256 of their bytes. */
async function dumpStorage(storage: LogStorage): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for await (const { key } of storage.list()) {
    const hash = createHash('sha256');
    for await (const chunk of await storage.get(key)) hash.update(new Uint8Array(chunk as Buffer));
    out[key] = hash.digest('hex');
  }
  return out;
}

async function backUpChangeRestore(url: string) {
  const storage = diskLogStorage(makeTempDir('slipless-backup-logs-'));
  const { database } = await prepareDatabase(url, storage);
  try {
    const storedBefore = await dumpStorage(storage);
    // The demo seed stores controller logs, so the uploads half of the backup has something to carry.
    expect(Object.keys(storedBefore).length).toBeGreaterThan(0);
    const before = await dumpDatabase(url);
    const folder = join(makeTempDir('slipless-backup-'), 'backup');
    const manifest = await createBackup(url, storage, folder);
    expect(manifest.uploads).toBe(Object.keys(storedBefore).length);
    expect(manifest.tables.sheets).toBe(before.sheets.length);
    expect(manifest.tables.sheet_revisions).toBe(before.sheet_revisions.length);

    // Change everything a backup must undo: a new sheet, a changed row, a removed log, a new log.
    const teamId = String(before.teams[0].id);
    await createTestSheet(database, teamId, 'written after the backup');
    await database.write((db) => db.update(users).set({ name: 'renamed after the backup' }).where(eq(users.id, String(before.user[0].id))));
    const [firstKey] = Object.keys(storedBefore);
    await storage.delete(firstKey);
    await storage.put('extra/after-backup', Readable.from([Buffer.from('time,q1\n0,0\n')]));
    expect(await dumpDatabase(url)).not.toEqual(before);

    await restoreBackup(url, storage, folder);
    expect(await dumpDatabase(url)).toEqual(before);
    expect(await dumpStorage(storage)).toEqual(storedBefore);
    return { manifest, folder };
  } finally {
    database.close();
  }
}

describe('tablesInDependencyOrder', () => {
  it('puts every table after the tables its foreign keys reference', () => {
    const tables = [
      { type: 'table' as const, name: 'child', sql: 'CREATE TABLE `child` (`p` text REFERENCES `parent`(`id`), `g` text REFERENCES "grand"("id"))' },
      { type: 'table' as const, name: 'parent', sql: 'CREATE TABLE `parent` (`id` text, `g` text REFERENCES `grand`(`id`))' },
      { type: 'table' as const, name: 'grand', sql: 'CREATE TABLE `grand` (`id` text)' },
    ];
    expect(tablesInDependencyOrder(tables).map((t) => t.name)).toEqual(['grand', 'parent', 'child']);
  });
});

describe('backup and restore of a SQLite file', () => {
  it('backs up while open (VACUUM INTO), and a restore brings back the rows and stored logs exactly', async () => {
    const { manifest, folder } = await backUpChangeRestore(tempDatabaseUrl());
    expect(manifest.method).toBe('vacuum-into');
    // SQLite's own check of the copy (sqlite.org, PRAGMA integrity_check: answers the single row "ok").
    const copy = createClient({ url: `file:${join(folder, 'database.db')}` });
    expect((await copy.execute('PRAGMA integrity_check')).rows[0][0]).toBe('ok');
    copy.close();
    expect(JSON.parse(readFileSync(join(folder, 'backup.json'), 'utf8')).uploads).toBe(manifest.uploads);
  });
});

describe.skipIf(!SQLD_AVAILABLE)('backup and restore of a libSQL server', () => {
  let server: SqldServer;
  afterAll(() => server?.stop());

  it('copies the server in one read transaction into a SQLite file, and a restore brings back the rows and stored logs exactly', async () => {
    server = await startSqld();
    const { manifest } = await backUpChangeRestore(server.url);
    expect(manifest.method).toBe('logical-copy');
  });
});
