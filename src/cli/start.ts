import { existsSync } from 'node:fs';
import { createServer } from 'node:http';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { DEFAULT_DATABASE_URL } from '../consts';
import { prepareDatabase } from '../lib/server/bootstrap';
import { edgeListener, parseTrustedProxies, type EdgeSettings, type NodeHandler } from '../lib/server/edge';
import { logStorageFromEnvironment } from '../lib/server/log-storage-backends';
import { startLogSweeper } from '../lib/server/log-sweeper';
import { localMailboxNotice, mailboxDir } from '../lib/server/local-mailbox';
import { configuredPublicOrigin } from '../lib/server/public-origin';
import { withStaticFiles } from '../lib/server/static-files';

// This command runs outside Astro, so it reads the settings declared in astro.config.mjs (env.schema)
// from the environment itself, with the same defaults; the app reads the same variables through astro:env.
let edge: EdgeSettings;
try {
  edge = { trustedProxies: parseTrustedProxies(process.env.TRUSTED_PROXIES), publicOrigin: configuredPublicOrigin() };
} catch (error) {
  console.error(`Slipless could not start. ${(error as Error).message}`);
  process.exit(1);
}

const url = process.env.DATABASE_URL?.trim() || DEFAULT_DATABASE_URL;

try {
  const logStorage = logStorageFromEnvironment(process.env);
  const { database, seed } = await prepareDatabase(url, logStorage);
  // Kept open for the sweeper: a crash between storing a log and recording it (or between
  // forgetting it and removing its bytes) leaves bytes no row refers to, removed once now and then hourly.
  startLogSweeper(database, logStorage);
  console.log(
    seed.seeded
      ? `Slipless: new database at ${url}, seeded the demo team (${seed.users} users, ${seed.sheets} sheets, ${seed.logs} controller logs).`
      : `Slipless: database at ${url} is up to date; existing data kept.`,
  );
} catch (error) {
  console.error(`Slipless could not start. ${(error as Error).message}`);
  console.error('Set DATABASE_URL to a writable SQLite file (file:path/to/file.db) or a reachable libSQL server (http://host:port).');
  process.exit(1);
}

if (!process.env.SMTP_HOST?.trim()) {
  console.log(`Slipless: no SMTP_HOST set; e-mail is not delivered. ${localMailboxNotice(mailboxDir(process.env.MAILBOX_DIR))}`);
}

const entry = resolve('dist/server/entry.mjs');
if (!existsSync(entry)) {
  console.error('Slipless could not start: dist/server/entry.mjs is missing. Run `npm run build` first (npm start does both).');
  process.exit(1);
}
// The adapter's middleware mode starts no server of its own (its standalone server would believe
// forwarding headers from any client); this process serves the build behind the edge listener.
const { handler } = (await import(pathToFileURL(entry).href)) as { handler: NodeHandler };
const host = process.env.HOST?.trim() || 'localhost';
const port = Number(process.env.PORT?.trim() || 4321);
const server = createServer(edgeListener(withStaticFiles(handler, resolve('dist/client')), edge));
server.on('error', (error) => {
  console.error(`Slipless could not listen on ${host}:${port}: ${error.message}`);
  process.exit(1);
});
server.listen(port, host, () => {
  console.log(`Slipless: listening on http://${host}:${port}${edge.publicOrigin ? `; public origin ${edge.publicOrigin}` : ''}.`);
});
