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

/** True for a file URL of an in-memory database, which exists only on the connection that opened it. */
function isMemoryUrl(url: string): boolean {
  return url === ':memory:' || url.startsWith('file::memory:');
}

/**
 * Opens the database at `url` (a SQLite file or a libSQL server) with the settings that keep
 * writes honest: a busy timeout and WAL for files, and one in-process queue for every write.
 *
 * A SQLite file gets a connection of its own for the queue, set to `synchronous = NORMAL`: in WAL
 * mode a commit then reaches the operating system (the WAL file) before it is acknowledged, so it
 * survives the process being killed, and the WAL is flushed to disk at checkpoints rather than at
 * every commit. A power cut or kernel crash can lose the last commits before a checkpoint (never
 * corrupt the file). The default (FULL) flushed at every commit, blocking the event loop for about
 * a millisecond each time; reads keep the other connections.
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
  // One connection (the pool's limit) so the PRAGMAs below hold for every queued write.
  const writer = isFile && !isMemoryUrl(clientUrl) ? createClient({ url: clientUrl, timeout: busyTimeoutMs, concurrency: 1 }) : client;
  const writerDb = writer === client ? db : drizzle(writer, { schema });
  let writerReady: Promise<void> | undefined;
  const prepareWriter = () =>
    (writerReady ??=
      writer === client
        ? Promise.resolve()
        : writer.executeMultiple(`PRAGMA busy_timeout = ${busyTimeoutMs}; PRAGMA foreign_keys = ON; PRAGMA synchronous = NORMAL;`).catch((error: unknown) => {
            writerReady = undefined;
            throw error;
          }));
  let queue: Promise<unknown> = Promise.resolve();
  let pending = 0;

  // A busy error can leave the libSQL connection acknowledging writes it never commits,
  // so the connection is replaced and the caller told that nothing was saved.
  async function runQueued<T>(work: () => Promise<T>): Promise<T> {
    pending++;
    const run = queue.then(async () => {
      try {
        await prepareWriter();
        return await work();
      } catch (error) {
        if (isBusyError(error)) {
          void writer.reconnect();
          // The new connection starts with SQLite's defaults.
          writerReady = undefined;
        }
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
    write: (work) => runQueued(() => work(writerDb)),
    transaction: (work) => runQueued(() => writerDb.transaction(work)),
    pendingWrites: () => pending,
    close: () => {
      client.close();
      if (writer !== client) writer.close();
    },
  };
}

/** Applies the generated migrations in `drizzle/` that this database has not seen yet. */
export async function migrateDatabase(database: Database, folder = MIGRATIONS_FOLDER): Promise<void> {
  await database.write((db) => migrate(db, { migrationsFolder: resolve(folder) }));
}

export { schema };
