import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase } from '../../../src/db';
import { tempDatabaseUrl } from '../../helpers/temp';

describe('the sheet list reads a bounded number of rows per listed sheet', () => {
  it("finds a sheet's last checked revision by an index seek, not a walk over its revisions", async () => {
    const database = await openDatabase(tempDatabaseUrl());
    await migrateDatabase(database);
    // The correlated subquery the sheet list runs for each row (lastCheckedRevision in src/lib/server/sheets.ts).
    // SQLite's EXPLAIN QUERY PLAN (sqlite.org/eqp.html) names the index and the columns it binds; a COVERING index
    // with both sheet_id and review_state bound answers max(number) from the index alone.
    const plan = await database.db.all<{ detail: string }>(
      sql.raw(`EXPLAIN QUERY PLAN SELECT (SELECT max(r.number) FROM sheet_revisions r WHERE r.sheet_id = s.id AND r.review_state = 'checked') FROM sheets s`),
    );
    const search = plan.map((row) => row.detail).find((detail) => detail.includes('SEARCH r'));
    expect(search).toContain('COVERING INDEX sheet_revisions_review_idx (sheet_id=? AND review_state=?)');
    database.client.close();
  });
});
