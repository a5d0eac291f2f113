import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { MIGRATIONS_FOLDER } from '../../consts';
import type { Database } from '../../db';

export interface MigrationLevel {
  applied: number;
  expected: number;
  latest: string | null;
  upToDate: boolean;
}

interface Journal {
  entries: { idx: number; tag: string; when: number }[];
}

/** Reads the migration journal that drizzle-kit wrote next to the SQL files. */
function readJournal(folder: string): Journal {
  return JSON.parse(readFileSync(resolve(folder, 'meta/_journal.json'), 'utf8')) as Journal;
}

/** How many of the shipped migrations this database has applied, and the latest one's tag. */
export async function getMigrationLevel(database: Database, folder = MIGRATIONS_FOLDER): Promise<MigrationLevel> {
  const journal = readJournal(folder);
  const table = await database.client.execute(
    "SELECT name FROM sqlite_master WHERE type = 'table' AND name = '__drizzle_migrations'",
  );
  const applied = table.rows.length
    ? Number((await database.client.execute('SELECT count(*) AS n FROM __drizzle_migrations')).rows[0].n)
    : 0;
  const latest = applied > 0 ? (journal.entries[applied - 1]?.tag ?? null) : null;
  return { applied, expected: journal.entries.length, latest, upToDate: applied === journal.entries.length };
}
