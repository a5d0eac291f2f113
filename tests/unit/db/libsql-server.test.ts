import { count } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { sheetRevisions, users } from '../../../src/db/schema';
import { checkHealth } from '../../../src/lib/server/health';
import { seedDemoData } from '../../../src/lib/server/seed';
import { createTestSheet } from '../../helpers/test-sheets';
import { SQLD_AVAILABLE, startSqld, type SqldServer } from '../../helpers/sqld';

describe.skipIf(!SQLD_AVAILABLE)('the same data layer on a libSQL server (sqld over http://)', () => {
  let server: SqldServer;
  let database: Database;

  beforeAll(async () => {
    server = await startSqld();
    database = await openDatabase(server.url);
  }, 30_000);

  afterAll(async () => {
    database?.close();
    await server?.stop();
  });

  it('migrates, seeds the demo team once and reports healthy', async () => {
    await migrateDatabase(database);
    expect((await seedDemoData(database)).seeded).toBe(true);
    expect((await seedDemoData(database)).seeded).toBe(false);
    const [{ n }] = await database.db.select({ n: count() }).from(users);
    expect(n).toBe(4);
    expect(await checkHealth(database)).toMatchObject({ status: 'ok', database: { kind: 'server' } });
  });

  it('keeps all of 100 concurrent saves', async () => {
    const teamId = (await database.client.execute('SELECT id FROM teams LIMIT 1')).rows[0].id as string;
    const before = (await database.db.select({ n: count() }).from(sheetRevisions))[0].n;
    const results = await Promise.all(
      Array.from({ length: 100 }, (_, i) => createTestSheet(database, teamId, `srv-${i}`)),
    );
    expect(new Set(results.map((r) => r.sheetId)).size).toBe(100);
    const after = (await database.db.select({ n: count() }).from(sheetRevisions))[0].n;
    expect(after - before).toBe(100);
  });
});
