import { randomBytes } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import { migrateDatabase, openDatabase, type Database } from '../../db';
import { appMeta } from '../../db/schema';
import type { LogStorage } from './log-storage-backends';
import { seedDemoData, type SeedOutcome } from './seed';

export class StartupError extends Error {}

/** Records the start time; doubles as the write probe that catches read-only databases early. */
async function recordStart(database: Database): Promise<void> {
  const now = new Date().toISOString();
  await database.write((db) =>
    db.insert(appMeta).values({ key: 'last_start', value: now }).onConflictDoUpdate({ target: appMeta.key, set: { value: sql`excluded.value` } }),
  );
}

const LOOPBACK_HOSTS = new Set(['', 'localhost', '127.0.0.1', '::1']);

/**
 * The warning for a secret kept in the database of an install that others use: marked
 * production, listening beyond loopback, or sending real mail. Whoever reads the database or a
 * backup of it could then sign session cookies for any account. Null for a local install.
 */
export function authSecretWarning(env: NodeJS.ProcessEnv): string | null {
  const shared = env.NODE_ENV === 'production' || !LOOPBACK_HOSTS.has(env.HOST?.trim() ?? '') || !!env.SMTP_HOST?.trim();
  if (!shared) return null;
  return (
    'Slipless: AUTH_SECRET is not set, so the key that signs session cookies is kept in the database; anyone who can read ' +
    'the database or a backup of it can sign in as anyone. Set AUTH_SECRET (32 random bytes, e.g. `openssl rand -base64 32`) ' +
    'from your secret manager or service environment.'
  );
}

/** The generated secret that signs session cookies when AUTH_SECRET is unset: made once and kept in the database, so sessions survive restarts without any setup. */
export async function storedAuthSecret(database: Database): Promise<string> {
  await database.write((db) =>
    db.insert(appMeta).values({ key: 'auth_secret', value: randomBytes(32).toString('base64url') }).onConflictDoNothing(),
  );
  const [row] = await database.db.select().from(appMeta).where(eq(appMeta.key, 'auth_secret'));
  return row.value;
}

/**
 * The secret that signs session cookies: AUTH_SECRET when set, else the stored one, with a
 * warning at start on an install that others use.
 */
export async function ensureAuthSecret(database: Database, env: NodeJS.ProcessEnv = process.env): Promise<string> {
  if (env.AUTH_SECRET) return env.AUTH_SECRET;
  const warning = authSecretWarning(env);
  if (warning) console.warn(warning);
  return storedAuthSecret(database);
}

/** Opens, migrates, write-probes and (only when empty) seeds the database named by DATABASE_URL; the demo logs go to `logStorage` when given. */
export async function prepareDatabase(url: string, logStorage?: LogStorage): Promise<{ database: Database; seed: SeedOutcome }> {
  let database: Database | undefined;
  try {
    database = await openDatabase(url);
    await migrateDatabase(database);
    await recordStart(database);
    const seed = await seedDemoData(database, undefined, logStorage);
    await ensureAuthSecret(database);
    return { database, seed };
  } catch (error) {
    database?.close();
    const reason = error instanceof Error ? (error.cause instanceof Error ? error.cause.message : error.message) : String(error);
    throw new StartupError(`Cannot use the database at DATABASE_URL=${url}: ${reason}`);
  }
}
