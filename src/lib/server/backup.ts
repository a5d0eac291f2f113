/** Backups and restores of the database and the stored controller logs; free of astro:env so the CLI runs it outside Astro. */
import { createReadStream, createWriteStream, existsSync } from 'node:fs';
import { mkdir, opendir, readFile, writeFile } from 'node:fs/promises';
import { dirname, join, relative, sep } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { createClient, type Client, type InStatement, type Transaction } from '@libsql/client';
import { DATABASE_BUSY_TIMEOUT_MS } from '../../consts';
import { isFileUrl } from '../../db';
import type { LogStorage } from './log-storage-backends';

/** File names inside a backup folder. */
export const BACKUP_DATABASE = 'database.db';
export const BACKUP_UPLOADS = 'uploads';
export const BACKUP_MANIFEST = 'backup.json';

/** Rows copied per statement batch: bounded memory for large tables, few round trips to a server. */
const ROWS_PER_BATCH = 500;

export interface BackupManifest {
  createdAt: string;
  /** How the database copy was made: SQLite's VACUUM INTO for a file, a logical copy in one read transaction for a server. */
  method: 'vacuum-into' | 'logical-copy';
  tables: Record<string, number>;
  uploads: number;
}

interface SchemaEntry {
  type: 'table' | 'index' | 'trigger' | 'view';
  name: string;
  sql: string;
}

/** A client for `url`; integers as bigint so no stored value loses precision on the way through. */
function openClient(url: string): Client {
  const fileUrl = isFileUrl(url) && !url.startsWith('file:') ? `file:${url}` : url;
  return createClient(isFileUrl(url) ? { url: fileUrl, intMode: 'bigint', timeout: DATABASE_BUSY_TIMEOUT_MS } : { url, intMode: 'bigint' });
}

const quoteName = (name: string) => `"${name.replaceAll('"', '""')}"`;

/** The schema's own objects (tables, indexes, triggers, views), SQLite's internal ones left out. */
async function readSchema(reader: Pick<Client, 'execute'>): Promise<SchemaEntry[]> {
  const result = await reader.execute("SELECT type, name, sql FROM sqlite_master WHERE sql IS NOT NULL AND name NOT LIKE 'sqlite_%' ORDER BY rowid");
  return result.rows.map((row) => ({ type: row.type as SchemaEntry['type'], name: String(row.name), sql: String(row.sql) }));
}

/**
 * Tables ordered so that every table comes after the tables its foreign keys point at (read from
 * each CREATE TABLE's REFERENCES clauses): inserts in this order and deletes in the reverse one
 * never break a foreign key.
 */
export function tablesInDependencyOrder(tables: readonly SchemaEntry[]): SchemaEntry[] {
  const byName = new Map(tables.map((t) => [t.name, t]));
  const ordered: SchemaEntry[] = [];
  const state = new Map<string, 'visiting' | 'done'>();
  const visit = (table: SchemaEntry) => {
    if (state.get(table.name)) return;
    state.set(table.name, 'visiting');
    for (const [, name] of table.sql.matchAll(/REFERENCES\s+["`[]?([^"`\]\s(]+)/gi)) {
      const parent = byName.get(name);
      if (parent && parent !== table) visit(parent);
    }
    state.set(table.name, 'done');
    ordered.push(table);
  };
  for (const table of tables) visit(table);
  return ordered;
}

/** Every row of `table`, a page at a time in rowid order (SQLite's default key; the schema has no WITHOUT ROWID tables). */
async function* readRows(reader: Pick<Client, 'execute'>, table: string): AsyncGenerator<{ columns: string[]; rows: unknown[][] }> {
  let after: unknown = null;
  for (;;) {
    const page = await reader.execute({
      sql: `SELECT rowid AS __rowid, * FROM ${quoteName(table)} WHERE ? IS NULL OR rowid > ? ORDER BY rowid LIMIT ${ROWS_PER_BATCH}`,
      args: [after as bigint | null, after as bigint | null],
    });
    if (!page.rows.length) return;
    const columns = page.columns.slice(1);
    yield { columns, rows: page.rows.map((row) => columns.map((_, i) => row[i + 1])) };
    after = page.rows.at(-1)![0];
    if (page.rows.length < ROWS_PER_BATCH) return;
  }
}

function insertStatements(table: string, columns: string[], rows: unknown[][]): InStatement[] {
  const sql = `INSERT INTO ${quoteName(table)} (${columns.map(quoteName).join(', ')}) VALUES (${columns.map(() => '?').join(', ')})`;
  return rows.map((args) => ({ sql, args: args as never }));
}

/** Copies schema and rows from `reader` into `writer` (both inside their transactions); returns the row count per table. */
async function copyDatabase(reader: Pick<Client, 'execute'>, writer: Pick<Transaction, 'execute' | 'batch'>): Promise<Record<string, number>> {
  const schema = await readSchema(reader);
  const tables = tablesInDependencyOrder(schema.filter((e) => e.type === 'table'));
  const counts: Record<string, number> = {};
  for (const table of tables) await writer.execute(table.sql);
  for (const table of tables) {
    counts[table.name] = 0;
    for await (const { columns, rows } of readRows(reader, table.name)) {
      await writer.batch(insertStatements(table.name, columns, rows));
      counts[table.name] += rows.length;
    }
  }
  for (const entry of schema.filter((e) => e.type !== 'table')) await writer.execute(entry.sql);
  return counts;
}

async function countRows(reader: Pick<Client, 'execute'>): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of (await readSchema(reader)).filter((e) => e.type === 'table')) {
    counts[table.name] = Number((await reader.execute(`SELECT count(*) FROM ${quoteName(table.name)}`)).rows[0][0]);
  }
  return counts;
}

/**
 * Writes a consistent copy of the database at `databaseUrl` to the SQLite file `target` while the
 * app runs. A file is copied by SQLite itself (`VACUUM INTO`, a transactionally consistent copy).
 * A libSQL server has no client-side snapshot call, so its schema and rows are read inside one
 * read transaction (one consistent view) and written into a new local SQLite file.
 */
async function backupDatabaseTo(databaseUrl: string, target: string): Promise<{ method: BackupManifest['method']; tables: Record<string, number> }> {
  const source = openClient(databaseUrl);
  try {
    if (isFileUrl(databaseUrl)) {
      await source.execute({ sql: 'VACUUM INTO ?', args: [target] });
      const copy = openClient(target);
      try {
        return { method: 'vacuum-into', tables: await countRows(copy) };
      } finally {
        copy.close();
      }
    }
    const copy = openClient(target);
    const read = await source.transaction('read');
    const write = await copy.transaction('write');
    try {
      const tables = await copyDatabase(read, write);
      await write.commit();
      return { method: 'logical-copy', tables };
    } finally {
      read.close();
      write.close();
      copy.close();
    }
  } finally {
    source.close();
  }
}

/** Copies every stored log into `folder`, one file per key; returns how many. */
async function backupUploads(storage: LogStorage, folder: string): Promise<number> {
  let copied = 0;
  for await (const { key } of storage.list()) {
    const path = join(folder, ...key.split('/'));
    await mkdir(dirname(path), { recursive: true });
    await pipeline(await storage.get(key), createWriteStream(path));
    copied++;
  }
  return copied;
}

async function* filesUnder(folder: string): AsyncGenerator<string> {
  if (!existsSync(folder)) return;
  for await (const entry of await opendir(folder)) {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) yield* filesUnder(path);
    else if (entry.isFile()) yield path;
  }
}

/**
 * Backs up the database and the stored controller logs into the folder `target` (which must not
 * exist yet or be empty): `database.db` (a SQLite file), `uploads/` (one file per stored log) and
 * `backup.json` (what was copied). The database is copied first: a log uploaded meanwhile is then
 * in `uploads/` without a row, which the log sweeper removes after a restore, never the reverse.
 */
export async function createBackup(databaseUrl: string, storage: LogStorage, target: string): Promise<BackupManifest> {
  await mkdir(target, { recursive: true });
  const databaseFile = join(target, BACKUP_DATABASE);
  if (existsSync(databaseFile)) throw new Error(`${databaseFile} exists already; back up into a new folder.`);
  const { method, tables } = await backupDatabaseTo(databaseUrl, databaseFile);
  const uploads = await backupUploads(storage, join(target, BACKUP_UPLOADS));
  const manifest: BackupManifest = { createdAt: new Date().toISOString(), method, tables, uploads };
  await writeFile(join(target, BACKUP_MANIFEST), `${JSON.stringify(manifest, null, 2)}\n`);
  return manifest;
}

/**
 * Replaces the database's contents and the stored logs with those of the backup folder `source`.
 * The database is replaced in one write transaction (all tables dropped, recreated and refilled;
 * on any error nothing changes); stored logs not in the backup are removed. Stop the app first:
 * requests served during a restore would see it half done in the log storage.
 */
export async function restoreBackup(databaseUrl: string, storage: LogStorage, source: string): Promise<BackupManifest> {
  const manifest = JSON.parse(await readFile(join(source, BACKUP_MANIFEST), 'utf8')) as BackupManifest;
  const backup = openClient(join(source, BACKUP_DATABASE));
  const target = openClient(databaseUrl);
  try {
    const write = await target.transaction('write');
    try {
      const existing = await readSchema(write);
      for (const entry of existing.filter((e) => e.type === 'view' || e.type === 'trigger')) {
        await write.execute(`DROP ${entry.type.toUpperCase()} IF EXISTS ${quoteName(entry.name)}`);
      }
      for (const table of tablesInDependencyOrder(existing.filter((e) => e.type === 'table')).reverse()) {
        await write.execute(`DROP TABLE ${quoteName(table.name)}`);
      }
      await copyDatabase(backup, write);
      await write.commit();
    } finally {
      write.close();
    }
  } finally {
    backup.close();
    target.close();
  }

  const uploadsFolder = join(source, BACKUP_UPLOADS);
  const restored = new Set<string>();
  for await (const path of filesUnder(uploadsFolder)) {
    const key = relative(uploadsFolder, path).split(sep).join('/');
    await storage.put(key, createReadStream(path));
    restored.add(key);
  }
  const stale: string[] = [];
  for await (const { key } of storage.list()) if (!restored.has(key)) stale.push(key);
  for (const key of stale) await storage.delete(key);
  return manifest;
}

