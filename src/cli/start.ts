import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { DEFAULT_DATABASE_URL } from '../consts';
import { prepareDatabase } from '../lib/server/bootstrap';

const url = process.env.DATABASE_URL?.trim() || DEFAULT_DATABASE_URL;
process.env.DATABASE_URL = url;

try {
  const { database, seed, authSecret } = await prepareDatabase(url);
  process.env.AUTH_SECRET = authSecret;
  database.close();
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

const entry = resolve('dist/server/entry.mjs');
if (!existsSync(entry)) {
  console.error('Slipless could not start: dist/server/entry.mjs is missing. Run `npm run build` first (npm start does both).');
  process.exit(1);
}
await import(pathToFileURL(entry).href);
