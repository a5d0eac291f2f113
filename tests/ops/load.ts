/**
 * `npm run test:load`: 50 clients against the built app from this second process (autocannon),
 * reading the sheet list, reading one sheet, and saving (each client to its own sheet, so every
 * save is a real new revision, never a 409). Prints requests per second, latency percentiles and
 * errors per phase. LOAD_SECONDS sets each phase's length (default 10); BASE_URL points it at a
 * running app instead of starting one on a fresh database.
 */
import autocannon from 'autocannon';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from '../e2e/app-process';
import { createSheets, editorSession } from './session';

const CLIENTS = 50;
const SECONDS = Number(process.env.LOAD_SECONDS ?? 10);

interface PhaseResult {
  phase: string;
  requests: number;
  perSecond: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  non2xx: number;
  meanBytes: number;
}

function percentile(sorted: number[], p: number): number {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN;
}

async function runPhase(phase: string, options: autocannon.Options): Promise<PhaseResult> {
  const times: number[] = [];
  let bytes = 0;
  const instance = autocannon({ connections: CLIENTS, duration: SECONDS, ...options });
  instance.on('response', (_client: autocannon.Client, _status: number, resBytes: number, responseTime: number) => {
    times.push(responseTime);
    bytes += resBytes;
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  return {
    phase,
    requests: result.requests.total,
    perSecond: Math.round(result.requests.total / SECONDS),
    p50: percentile(times, 50),
    p95: percentile(times, 95),
    p99: percentile(times, 99),
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
    meanBytes: Math.round(bytes / Math.max(1, times.length)),
  };
}

let app: AppProcess | undefined;
try {
  let baseUrl = process.env.BASE_URL;
  if (!baseUrl) {
    app = await startApp({ port: await freePort(), databaseUrl: process.env.DATABASE_URL ?? tempDatabaseUrl(), env: { ...process.env, NODE_ENV: 'production' } });
    baseUrl = app.baseUrl;
  }
  const session = await editorSession(baseUrl);
  const sheetIds = await createSheets(baseUrl, session, CLIENTS, 'load');
  const results: PhaseResult[] = [];
  results.push(await runPhase('sheet list', { url: `${baseUrl}/api/sheets`, headers: session.headers }));
  results.push(await runPhase('one sheet', { url: `${baseUrl}/api/sheets/${sheetIds[0]}`, headers: session.headers }));

  // Each connection saves to a sheet of its own, rebasing on its own last save.
  let nextSheet = 0;
  results.push(
    await runPhase('saves', {
      url: baseUrl,
      method: 'POST',
      headers: session.headers,
      setupClient(client: autocannon.Client) {
        const sheetId = sheetIds[nextSheet++ % sheetIds.length];
        let base = 1;
        // A request whose body is built anew before each send (autocannon's setupRequest), from this connection's own last revision.
        client.setRequests([
          {
            method: 'POST',
            path: `/api/sheets/${sheetId}/revisions`,
            headers: session.headers,
            setupRequest: (request) => ({ ...request, body: JSON.stringify({ baseRevision: base, document: session.document, message: `load save on ${base}` }) }),
          },
        ]);
        client.on('response', (status: number) => {
          if (status === 201) base++;
        });
      },
    }),
  );

  console.log(`${CLIENTS} clients, ${SECONDS} s per phase, against ${baseUrl}`);
  console.table(results);
  const failed = results.filter((r) => r.errors || r.non2xx);
  if (failed.length) {
    console.error(`Errors or non-2xx answers in: ${failed.map((r) => r.phase).join(', ')}`);
    process.exitCode = 1;
  }
} finally {
  await app?.stop();
}
