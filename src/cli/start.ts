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
import { appMetrics, createLogger, localsOf, observeRequests } from '../lib/server/observability';
import { shutDown } from '../lib/server/shutdown';
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
let closeStartDatabase = () => {};

try {
  const logStorage = logStorageFromEnvironment(process.env);
  const { database, seed } = await prepareDatabase(url, logStorage);
  // Kept open for the sweeper: a crash between storing a log and recording it (or between
  // forgetting it and removing its bytes) leaves bytes no row refers to, removed once now and then hourly.
  const sweeper = startLogSweeper(database, logStorage);
  appMetrics().writeQueues.add(database.pendingWrites);
  closeStartDatabase = () => {
    sweeper.stop();
    database.close();
  };
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
const { handler } = (await import(pathToFileURL(entry).href)) as { handler: (...args: Parameters<NodeHandler> | [...Parameters<NodeHandler>, undefined, object]) => unknown };
const host = process.env.HOST?.trim() || 'localhost';
const port = Number(process.env.PORT?.trim() || 4321);
const logger = createLogger();
const metrics = appMetrics();
// The adapter hands this locals object to the app, whose middleware notes the route and identity for the request's log line.
const app: NodeHandler = (req, res) => handler(req, res, undefined, localsOf(req));
const observed = observeRequests(withStaticFiles(app, resolve('dist/client')), { logger, metrics, metricsToken: process.env.METRICS_TOKEN?.trim() || null });
const server = createServer(edgeListener(observed, edge));
// An idle keep-alive connection stays open longer than a client or load balancer keeps its own (60 s is a usual
// balancer idle timeout): when the server closes first, a request sent on the closing socket meets a reset.
server.keepAliveTimeout = 65_000;
server.headersTimeout = 66_000;
let stopping = false;
for (const signal of ['SIGTERM', 'SIGINT'] as const) {
  process.once(signal, () => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutdown: no new connections; finishing requests and writes in progress');
    const pendingWrites = () => [...metrics.writeQueues].reduce((sum, depth) => sum + depth(), 0);
    // The app's own connection closes with the process; the start command's is closed here once writes are done.
    void shutDown({ server, pendingWrites, close: closeStartDatabase, logger }).then(() => process.exit(0));
  });
}
server.on('error', (error) => {
  console.error(`Slipless could not listen on ${host}:${port}: ${error.message}`);
  process.exit(1);
});
server.listen(port, host, () => {
  console.log(`Slipless: listening on http://${host}:${port}${edge.publicOrigin ? `; public origin ${edge.publicOrigin}` : ''}.`);
});
