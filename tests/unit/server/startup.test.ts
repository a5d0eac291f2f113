import { execFile } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { count } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { sheets, users } from '../../../src/db/schema';
import { prepareDatabase } from '../../../src/lib/server/bootstrap';
import { createTestSheet } from '../../helpers/test-sheets';
import { freePort, makeTempDir, tempDatabaseUrl } from '../../helpers/temp';

const exec = promisify(execFile);

/** Runs the start command with the given DATABASE_URL and returns its exit code and stderr. */
async function start(databaseUrl: string, wrap: string[] = []): Promise<{ code: number; stderr: string }> {
  const command = [...wrap, 'npx', 'tsx', 'src/cli/start.ts'];
  try {
    await exec(command[0], command.slice(1), { env: { ...process.env, DATABASE_URL: databaseUrl }, timeout: 60_000 });
    return { code: 0, stderr: '' };
  } catch (error) {
    const { code, stderr } = error as { code: number; stderr: string };
    return { code, stderr };
  }
}

describe('start command with a database it cannot use', () => {
  it('exits with a clear error naming DATABASE_URL when the server is unreachable', async () => {
    const url = `http://127.0.0.1:${await freePort()}`;
    const { code, stderr } = await start(url);
    expect(code).toBe(1);
    expect(stderr).toContain(`DATABASE_URL=${url}`);
  }, 60_000);

  it('exits with a clear error when the file sits under a regular file', async () => {
    const blocker = join(makeTempDir(), 'not-a-folder');
    writeFileSync(blocker, 'x');
    const { code, stderr } = await start(`file:${blocker}/slipless.db`);
    expect(code).toBe(1);
    expect(stderr).toMatch(/DATABASE_URL=file:.*cannot be written/);
  }, 60_000);

  it('exits with a clear error when the database file is read-only', async () => {
    const folder = makeTempDir();
    const source = `file:${join(folder, 'source.db')}`;
    (await prepareDatabase(source)).database.close();
    const readOnlyDir = makeTempDir();
    const target = `file:${join(readOnlyDir, 'source.db')}`;
    // Root ignores file modes, so as root the file is put on a read-only tmpfs in a private mount namespace.
    const wrap =
      process.getuid?.() === 0
        ? ['unshare', '-m', 'sh', '-c', `mount -t tmpfs tmpfs "${readOnlyDir}" && cp "${folder}/source.db" "${readOnlyDir}/" && mount -o remount,ro "${readOnlyDir}" && exec "$0" "$@"`]
        : ['sh', '-c', `cp "${folder}/source.db" "${readOnlyDir}/" && chmod 0444 "${readOnlyDir}/source.db" && chmod 0555 "${readOnlyDir}" && exec "$0" "$@"`];
    const { code, stderr } = await start(target, wrap);
    expect(code).toBe(1);
    expect(stderr).toContain(`DATABASE_URL=${target}`);
    expect(stderr).toContain('read-only');
  }, 60_000);
});

describe('prepareDatabase', () => {
  it('seeds an empty database once; a second start keeps everything and adds nothing', async () => {
    const url = tempDatabaseUrl();
    const first = await prepareDatabase(url);
    expect(first.seed).toMatchObject({ seeded: true, users: 4 });
    const teamId = (await first.database.client.execute('SELECT id FROM teams')).rows[0].id as string;
    await createTestSheet(first.database, teamId, 'made between starts');
    const sheetsBefore = (await first.database.db.select({ n: count() }).from(sheets))[0].n;
    first.database.close();

    const second = await prepareDatabase(url);
    expect(second.seed.seeded).toBe(false);
    expect((await second.database.db.select({ n: count() }).from(users))[0].n).toBe(4);
    expect((await second.database.db.select({ n: count() }).from(sheets))[0].n).toBe(sheetsBefore);
    second.database.close();
  });
});
