import { existsSync } from 'node:fs';
import { createServer } from 'node:http';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { DEFAULT_DATABASE_URL } from '../consts';
import type { Database } from '../db';
import { prepareDatabase } from '../lib/server/bootstrap';
import { edgeListener, parseTrustedProxies, type EdgeSettings, type NodeHandler } from '../lib/server/edge';
import { startFakeSmtp, useFakeSmtp } from '../lib/server/fake-smtp';
import { configuredPublicOrigin } from '../lib/server/public-origin';

let edge: EdgeSettings;
try {
  edge = { trustedProxies: parseTrustedProxies(process.env.TRUSTED_PROXIES), publicOrigin: configuredPublicOrigin() };
} catch (error) {
  console.error(`Slipless could not start. ${(error as Error).message}`);
  process.exit(1);
}

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
  // Without a relay, mail is kept through this connection, which stays open for it; the fake
  // server prints each mail to this log and saves it in its mailbox folder, for the operator only.
  const smtp = await startFakeSmtp(database);
  useFakeSmtp(smtp);
  console.log(`Slipless: no SMTP_HOST set; e-mail is not delivered (SMTP on ${smtp.host}:${smtp.port}).`);
}

const entry = resolve('dist/server/entry.mjs');
if (!existsSync(entry)) {
  console.error('Slipless could not start: dist/server/entry.mjs is missing. Run `npm run build` first (npm start does both).');
  process.exit(1);
}
// The built entry would otherwise start Astro's own server, which believes forwarding headers
// from any client; this process serves it behind the edge listener instead.
process.env.ASTRO_NODE_AUTOSTART = 'disabled';
const { handler } = (await import(pathToFileURL(entry).href)) as { handler: NodeHandler };
const host = process.env.HOST?.trim() || 'localhost';
const port = Number(process.env.PORT?.trim() || 4321);
const server = createServer(edgeListener(handler, edge));
server.on('error', (error) => {
  console.error(`Slipless could not listen on ${host}:${port}: ${error.message}`);
  process.exit(1);
});
server.listen(port, host, () => {
  console.log(`Slipless: listening on http://${host}:${port}${edge.publicOrigin ? `; public origin ${edge.publicOrigin}` : ''}.`);
});
