import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { sql } from 'drizzle-orm';
import { afterEach, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { findSheet } from '../../../src/lib/server/sheets';
import { makeTempDir, tempDatabaseUrl } from '../../helpers/temp';

const opened: Database[] = [];
afterEach(() => opened.splice(0).forEach((d) => d.close()));

/** The migrations folder as it stood before review state moved onto revisions (the first four migrations). */
function migrationsBeforeReviewState(): string {
  const folder = makeTempDir();
  cpSync('drizzle', folder, { recursive: true });
  const journalPath = join(folder, 'meta', '_journal.json');
  const journal = JSON.parse(readFileSync(journalPath, 'utf8'));
  journal.entries = journal.entries.filter((e: { tag: string }) => e.tag <= '0003');
  writeFileSync(journalPath, JSON.stringify(journal));
  return folder;
}

describe('moving review state from sheets onto revisions', () => {
  it("gives each sheet's latest revision the sheet's status and leaves earlier revisions drafts", async () => {
    const database = await openDatabase(tempDatabaseUrl());
    opened.push(database);
    await migrateDatabase(database, migrationsBeforeReviewState());
    const run = (text: string) => database.write((db) => db.run(sql.raw(text)));
    await run("INSERT INTO teams (id, slug, name) VALUES ('t', 't', 'Team')");
    for (const [id, status, latest] of [
      ['approved-sheet', 'approved', 2],
      ['asked-sheet', 'changes-requested', 1],
      ['in-review-sheet', 'in-review', 1],
    ] as const) {
      await run(`INSERT INTO sheets (id, team_id, title, status, latest_revision) VALUES ('${id}', 't', '${id}', '${status}', ${latest})`);
      for (let n = 1; n <= latest; n++) await run(`INSERT INTO sheet_revisions (id, sheet_id, number, inputs) VALUES ('${id}-${n}', '${id}', ${n}, '{}')`);
    }

    await migrateDatabase(database);

    const states = await database.client.execute('SELECT id, review_state FROM sheet_revisions ORDER BY id');
    expect(states.rows.map((r) => [r.id, r.review_state])).toEqual([
      ['approved-sheet-1', 'draft'],
      ['approved-sheet-2', 'approved'],
      ['asked-sheet-1', 'changes-requested'],
      ['in-review-sheet-1', 'draft'],
    ]);
    expect(await findSheet(database, 'approved-sheet')).toMatchObject({ reviewState: 'approved', lastCheckedRevision: 2 });
    expect(await findSheet(database, 'asked-sheet')).toMatchObject({ reviewState: 'changes-requested', lastCheckedRevision: null });
  });
});
