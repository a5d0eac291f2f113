import { DATABASE_URL } from 'astro:env/server';
import { DEFAULT_DATABASE_URL } from '../../consts';
import { openDatabase, type Database } from '../../db';
import { appMetrics } from './observability';

let opened: Promise<Database> | undefined;

/** The server's one database connection, opened on first use from DATABASE_URL. */
export function getDatabase(): Promise<Database> {
  opened ??= openDatabase(DATABASE_URL?.trim() || DEFAULT_DATABASE_URL).then((database) => {
    appMetrics().writeQueues.add(database.pendingWrites);
    return database;
  });
  return opened;
}
