import { accessSync, constants, existsSync, mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { createClient, type Client } from '@libsql/client';
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql';
import { migrate } from 'drizzle-orm/libsql/migrator';
import { DATABASE_BUSY_TIMEOUT_MS, MIGRATIONS_FOLDER } from '../consts';
import * as schema from './schema';

export type DrizzleDb = LibSQLDatabase<typeof schema>;
type TransactionFn = Parameters<DrizzleDb['transaction']>[0];
export type Transaction = Parameters<TransactionFn>[0];

export interface Database {
  readonly url: string;
  readonly isFile: boolean;
  /** For reads; every write goes through `write` or `transaction`. */
  readonly db: DrizzleDb;
  readonly client: Client;
  /** Runs one write after all earlier ones have settled; rejects unless it committed. */
  write<T>(work: (db: DrizzleDb) => Promise<T>): Promise<T>;
  /** Runs a transaction through the same queue as `write`. */
  transaction<T>(work: (tx: Transaction) => Promise<T>): Promise<T>;
  /** Writes and transactions queued or running now (for the write-queue metric and shutdown). */
  pendingWrites(): number;
  close(): void;
}

export class DatabaseConfigError extends Error {}

/** True for URLs of a local SQLite file (`file:` or a bare path). */
export function isFileUrl(url: string): boolean {
  return url.startsWith('file:') || !/^[a-z]+:/i.test(url);
}

/** True when an error (or any error in its cause chain) is SQLite's "database is busy/locked". */
export function isBusyError(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 6; depth++) {
    const { code, message, cause } = e as { code?: unknown; message?: unknown; cause?: unknown };
    if (typeof code === 'string' && /SQLITE_BUSY|SQLITE_LOCKED/.test(code)) return true;
    if (typeof message === 'string' && /SQLITE_BUSY|database is locked/i.test(message)) return true;
    e = cause;
  }
  return false;
}

/** Creates the file's folder and refuses files that cannot be written, with the reason. */
function prepareFileUrl(url: string): string {
  if (url === ':memory:' || url === 'file::memory:') return url;
  const path = resolve(url.replace(/^file:/, '').split('?')[0]);
  try {
    mkdirSync(dirname(path), { recursive: true });
    accessSync(dirname(path), constants.W_OK);
    if (existsSync(path)) accessSync(path, constants.W_OK);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'EROFS' || code === 'EACCES' || code === 'EPERM' ? 'it is read-only' : 'its folder cannot be created';
    throw new DatabaseConfigError(`the file ${path} cannot be written (${why}: ${code})`);
  }
  return url.startsWith('file:') ? url : `file:${url}`;
}

/**
 * Opens the database at `url` (a SQLite file or a libSQL server) with the settings that keep
 * writes honest: a busy timeout and WAL for files, and one in-process queue for every write.
 */
export async function openDatabase(url: string, { busyTimeoutMs = DATABASE_BUSY_TIMEOUT_MS } = {}): Promise<Database> {
  if (!url.trim()) throw new DatabaseConfigError('DATABASE_URL is empty');
  const isFile = isFileUrl(url);
  const clientUrl = isFile ? prepareFileUrl(url) : url;
  const client = createClient(isFile ? { url: clientUrl, timeout: busyTimeoutMs } : { url: clientUrl });
  if (isFile) {
    await client.execute('PRAGMA journal_mode = WAL');
    await client.execute(`PRAGMA busy_timeout = ${busyTimeoutMs}`);
    await client.execute('PRAGMA foreign_keys = ON');
  }
  const db = drizzle(client, { schema });
  let queue: Promise<unknown> = Promise.resolve();
  let pending = 0;

  // A busy error can leave the libSQL connection acknowledging writes it never commits,
  // so the connection is replaced and the caller told that nothing was saved.
  async function runQueued<T>(work: () => Promise<T>): Promise<T> {
    pending++;
    const run = queue.then(async () => {
      try {
        return await work();
      } catch (error) {
        if (isBusyError(error)) client.reconnect();
        throw error;
      }
    });
    queue = run.catch(() => undefined).finally(() => pending--);
    return run;
  }

  return {
    url,
    isFile,
    db,
    client,
    write: (work) => runQueued(() => work(db)),
    transaction: (work) => runQueued(() => db.transaction(work)),
    pendingWrites: () => pending,
    close: () => client.close(),
  };
}

/** Applies the generated migrations in `drizzle/` that this database has not seen yet. */
export async function migrateDatabase(database: Database, folder = MIGRATIONS_FOLDER): Promise<void> {
  await database.write((db) => migrate(db, { migrationsFolder: resolve(folder) }));
}

export { schema };
