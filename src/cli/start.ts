import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { DEFAULT_DATABASE_URL } from '../consts';
import type { Database } from '../db';
import { prepareDatabase } from '../lib/server/bootstrap';
import { startFakeSmtp, useFakeSmtp } from '../lib/server/fake-smtp';

const url = process.env.DATABASE_URL?.trim() || DEFAULT_DATABASE_URL;
process.env.DATABASE_URL = url;

let database: Database;
try {
  const prepared = await prepareDatabase(url);
  database = prepared.database;
  const { seed, authSecret } = prepared;
  process.env.AUTH_SECRET = authSecret;
  console.log(
    seed.seeded
      ? `Slipless: new database at ${url}, seeded the demo team (${seed.users} users, ${seed.sheets} sheets).`
      : `Slipless: database at ${url} is up to date; existing data kept.`,
  );
} catch (error) {
  console.error(`Slipless could not start. ${(error as Error).message}`);
  console.error('Set DATABASE_URL to a writable SQLite file (file:path/to/file.db) or a reachable libSQL server (http://host:port).');
  process.exit(1);
}

if (process.env.SMTP_HOST?.trim()) {
  database.close();
} else {
  // Without a relay, mail is kept in the database (through this connection, which stays open for
  // it) and shown to team owners at /team/outbox.
  const smtp = await startFakeSmtp(database);
  useFakeSmtp(smtp);
  console.log(`Slipless: no SMTP_HOST set; e-mail goes to the local outbox (SMTP on ${smtp.host}:${smtp.port}; team owners read it at /team/outbox).`);
}

const entry = resolve('dist/server/entry.mjs');
if (!existsSync(entry)) {
  console.error('Slipless could not start: dist/server/entry.mjs is missing. Run `npm run build` first (npm start does both).');
  process.exit(1);
}
await import(pathToFileURL(entry).href);
