import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { createClient } from '@libsql/client';
import { count, eq, inArray, sql } from 'drizzle-orm';
import { afterEach, describe, expect, it } from 'vitest';
import { isBusyError, migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { sheetRevisions, sheets, teams } from '../../../src/db/schema';
import { deleteSheet, saveRevision } from '../../../src/lib/server/sheets';
import { createTestSheet, exampleSheetDocument } from '../../helpers/test-sheets';
import { tempDatabaseUrl } from '../../helpers/temp';

const run = promisify(execFile);
const opened: Database[] = [];

async function freshDatabase(url = tempDatabaseUrl(), options?: { busyTimeoutMs?: number }) {
  const database = await openDatabase(url, options);
  opened.push(database);
  await migrateDatabase(database);
  const [team] = await database.write((db) => db.insert(teams).values({ slug: `t-${Math.random()}`, name: 'Test team' }).returning());
  return { database, teamId: team.id, url };
}

async function presentSheetIds(database: Database, ids: string[]): Promise<Set<string>> {
  const found = new Set<string>();
  for (let i = 0; i < ids.length; i += 400) {
    const rows = await database.db
      .select({ id: sheetRevisions.sheetId })
      .from(sheetRevisions)
      .where(inArray(sheetRevisions.sheetId, ids.slice(i, i + 400)));
    rows.forEach((r) => found.add(r.id));
  }
  return found;
}

afterEach(() => {
  opened.splice(0).forEach((d) => d.close());
});

describe('writes through the queue', () => {
  it('keeps every acknowledged save when 300 saves race in one process', async () => {
    const { database, teamId } = await freshDatabase();
    const results = await Promise.allSettled(
      Array.from({ length: 300 }, (_, i) => createTestSheet(database, teamId, `s${i}`)),
    );
    const acknowledged = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value.sheetId] : []));
    expect(acknowledged.length).toBe(300);
    expect((await presentSheetIds(database, acknowledged)).size).toBe(300);
  });

  it('keeps every acknowledged save when two processes write the same file at once', async () => {
    const { database, teamId, url } = await freshDatabase();
    const child = (label: string) =>
      run('npx', ['tsx', 'tests/helpers/concurrent-writer.mts', url, teamId, '150', label], { maxBuffer: 8 << 20 });
    const [a, b] = await Promise.all([child('a'), child('b')]);
    const outcomes = [a, b].map((r) => JSON.parse(r.stdout) as { acknowledged: string[]; failures: string[] });
    const acknowledged = outcomes.flatMap((o) => o.acknowledged);
    expect(outcomes.flatMap((o) => o.failures)).toEqual([]);
    expect(acknowledged.length).toBe(300);
    expect((await presentSheetIds(database, acknowledged)).size).toBe(300);
    const [{ n }] = await database.db.select({ n: count() }).from(sheets).where(eq(sheets.teamId, teamId));
    expect(n).toBe(300);
  }, 120_000);

  it('reports a save blocked past the busy timeout as failed, commits nothing for it, and recovers', async () => {
    const { database, teamId, url } = await freshDatabase(undefined, { busyTimeoutMs: 200 });
    const blocker = createClient({ url, timeout: 5_000 });
    const held = await blocker.transaction('write');
    await held.execute("INSERT INTO app_meta (key, value) VALUES ('lock', 'held')");
    const blocked = createTestSheet(database, teamId, 'blocked');
    await expect(blocked).rejects.toSatisfy(isBusyError);
    await held.rollback();
    blocker.close();

    const later = await createTestSheet(database, teamId, 'after');
    const titles = (await database.db.select({ title: sheets.title }).from(sheets)).map((r) => r.title);
    expect(titles).toEqual(['after']);
    expect((await presentSheetIds(database, [later.sheetId])).size).toBe(1);
  });
});

describe('the write connection of a SQLite file', () => {
  // SQLite documentation, PRAGMA synchronous: 1 is NORMAL, 2 is FULL; in WAL mode NORMAL keeps
  // every commit across a crash of the application (not across a power cut).
  const synchronousOf = async (run: (query: ReturnType<typeof sql>) => Promise<unknown[]>) => (await run(sql`PRAGMA synchronous`))[0];

  it('runs queued writes with synchronous = NORMAL in WAL mode, leaving the connections for reads at the default', async () => {
    const { database } = await freshDatabase();
    expect(await synchronousOf((q) => database.write((db) => db.all(q)))).toEqual({ synchronous: 1 });
    expect(await synchronousOf((q) => database.transaction((tx) => tx.all(q)))).toEqual({ synchronous: 1 });
    expect(await synchronousOf((q) => database.db.all(q))).toEqual({ synchronous: 2 });
    expect((await database.db.all(sql`PRAGMA journal_mode`))[0]).toEqual({ journal_mode: 'wal' });
  });

  it('sets synchronous = NORMAL again on the connection that replaces one after a busy error', async () => {
    const { database, teamId, url } = await freshDatabase(undefined, { busyTimeoutMs: 200 });
    const blocker = createClient({ url, timeout: 5_000 });
    const held = await blocker.transaction('write');
    await held.execute("INSERT INTO app_meta (key, value) VALUES ('lock', 'held')");
    await expect(createTestSheet(database, teamId, 'blocked')).rejects.toSatisfy(isBusyError);
    await held.rollback();
    blocker.close();
    expect(await synchronousOf((q) => database.write((db) => db.all(q)))).toEqual({ synchronous: 1 });
  });
});

describe('saveRevision', () => {
  it('numbers revisions 1, 2, 3 and refuses a save based on a stale revision', async () => {
    const { database, teamId } = await freshDatabase();
    const { sheetId } = await createTestSheet(database, teamId, 'pad');
    const edit = (title: string) => ({ ...(exampleSheetDocument as object), title });
    const save = (baseRevision: number, title: string) => saveRevision(database, { sheetId, baseRevision, document: edit(title), actor: { userId: null } });
    expect(await save(1, 'pad 2')).toMatchObject({ ok: true, value: { revision: 2 } });
    expect(await save(1, 'lost?')).toMatchObject({ ok: false, error: { kind: 'stale', latestRevision: 2 } });
    expect(await save(2, 'pad 3')).toMatchObject({ ok: true, value: { revision: 3 } });
    const numbers = (await database.db.select({ n: sheetRevisions.number }).from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheetId))).map((r) => r.n);
    expect(numbers.sort()).toEqual([1, 2, 3]);
  });

  it('answers not-found for a sheet deleted after its page was opened, and stores nothing for it', async () => {
    const { database, teamId } = await freshDatabase();
    const { sheetId } = await createTestSheet(database, teamId, 'gone');
    await deleteSheet(database, sheetId, { userId: null });
    expect(await saveRevision(database, { sheetId, baseRevision: 1, document: exampleSheetDocument, actor: { userId: null } })).toMatchObject({
      ok: false,
      error: { kind: 'not-found' },
    });
    const numbers = (await database.db.select({ n: sheetRevisions.number }).from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheetId))).map((r) => r.n);
    expect(numbers).toEqual([1]);
    const [sheet] = await database.db.select({ latest: sheets.latestRevision }).from(sheets).where(eq(sheets.id, sheetId));
    expect(sheet.latest).toBe(1);
  });

  it('answers not-found for an unknown sheet', async () => {
    const { database } = await freshDatabase();
    expect(await saveRevision(database, { sheetId: 'no-such-sheet', baseRevision: 1, document: exampleSheetDocument, actor: { userId: null } })).toMatchObject({
      ok: false,
      error: { kind: 'not-found' },
    });
  });
});
