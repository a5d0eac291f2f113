import { sql } from 'drizzle-orm';
import { migrateDatabase, openDatabase, type Database } from '../../db';
import { appMeta } from '../../db/schema';
import { seedDemoData, type SeedOutcome } from './seed';

export class StartupError extends Error {}

/** Records the start time; doubles as the write probe that catches read-only databases early. */
async function recordStart(database: Database): Promise<void> {
  const now = new Date().toISOString();
  await database.write((db) =>
    db.insert(appMeta).values({ key: 'last_start', value: now }).onConflictDoUpdate({ target: appMeta.key, set: { value: sql`excluded.value` } }),
  );
}

/** Opens, migrates, write-probes and (only when empty) seeds the database named by DATABASE_URL. */
export async function prepareDatabase(url: string): Promise<{ database: Database; seed: SeedOutcome }> {
  let database: Database | undefined;
  try {
    database = await openDatabase(url);
    await migrateDatabase(database);
    await recordStart(database);
    const seed = await seedDemoData(database);
    return { database, seed };
  } catch (error) {
    database?.close();
    const reason = error instanceof Error ? (error.cause instanceof Error ? error.cause.message : error.message) : String(error);
    throw new StartupError(`Cannot use the database at DATABASE_URL=${url}: ${reason}`);
  }
}
