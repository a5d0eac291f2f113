import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { sql } from 'drizzle-orm';
import { afterEach, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { findSheet } from '../../../src/lib/server/sheets';
import { makeTempDir, tempDatabaseUrl } from '../../helpers/temp';

const opened: Database[] = [];
afterEach(() => opened.splice(0).forEach((d) => d.close()));

/** The migrations folder as it stood up to (and including) the migration numbered `last`. */
function migrationsUpTo(last: string): string {
  const folder = makeTempDir();
  cpSync('drizzle', folder, { recursive: true });
  const journalPath = join(folder, 'meta', '_journal.json');
  const journal = JSON.parse(readFileSync(journalPath, 'utf8'));
  journal.entries = journal.entries.filter((e: { tag: string }) => e.tag.slice(0, 4) <= last);
  writeFileSync(journalPath, JSON.stringify(journal));
  return folder;
}

describe('moving review state from sheets onto revisions', () => {
  it("gives each sheet's latest revision the sheet's status and leaves earlier revisions drafts", async () => {
    const database = await openDatabase(tempDatabaseUrl());
    opened.push(database);
    await migrateDatabase(database, migrationsUpTo('0003'));
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
      ['approved-sheet-2', 'checked'],
      ['asked-sheet-1', 'returned'],
      ['in-review-sheet-1', 'draft'],
    ]);
    expect(await findSheet(database, 'approved-sheet')).toMatchObject({ reviewState: 'checked', lastCheckedRevision: 2 });
    expect(await findSheet(database, 'asked-sheet')).toMatchObject({ reviewState: 'returned', lastCheckedRevision: null });
  });
});

describe('the words of checking', () => {
  it('maps approved to checked and changes-requested to returned on revisions, signatures and audit events, and keeps remarks', async () => {
    const database = await openDatabase(tempDatabaseUrl());
    opened.push(database);
    await migrateDatabase(database, migrationsUpTo('0007'));
    const run = (text: string) => database.write((db) => db.run(sql.raw(text)));
    await run("INSERT INTO teams (id, slug, name) VALUES ('t', 't', 'Team')");
    await run("INSERT INTO sheets (id, team_id, title, latest_revision) VALUES ('s', 't', 'Parcel pinch', 3)");
    for (const [n, state] of [[1, 'approved'], [2, 'changes-requested'], [3, 'draft']] as const) {
      await run(`INSERT INTO sheet_revisions (id, sheet_id, number, inputs, review_state) VALUES ('r${n}', 's', ${n}, '{}', '${state}')`);
    }
    await run("INSERT INTO reviews (id, sheet_id, revision, verdict) VALUES ('v1', 's', 1, 'approved'), ('v2', 's', 2, 'changes-requested')");
    await run("INSERT INTO comments (id, sheet_id, revision, body) VALUES ('c1', 's', 2, 'Roll rate off by two.')");
    await run("INSERT INTO audit_events (id, team_id, action, subject) VALUES ('a1', 't', 'sheet.approve', 's'), ('a2', 't', 'sheet.request_changes', 's'), ('a3', 't', 'sheet.save', 's')");

    await migrateDatabase(database);

    const rows = async (text: string) => (await database.client.execute(text)).rows.map((r) => Object.values(r));
    expect(await rows('SELECT id, review_state FROM sheet_revisions ORDER BY id')).toEqual([['r1', 'checked'], ['r2', 'returned'], ['r3', 'draft']]);
    expect(await rows('SELECT id, verdict FROM reviews ORDER BY id')).toEqual([['v1', 'checked'], ['v2', 'returned']]);
    expect(await rows('SELECT id, action FROM audit_events ORDER BY id')).toEqual([['a1', 'sheet.check'], ['a2', 'sheet.return'], ['a3', 'sheet.save']]);
    expect(await rows('SELECT id, body, parent_id, resolved_at FROM comments')).toEqual([['c1', 'Roll rate off by two.', null, null]]);
    expect(await findSheet(database, 's')).toMatchObject({ reviewState: 'draft', lastCheckedRevision: 1 });
  });
});
