/**
 * `npm run test:load`: 50 clients against the built app from this second process (autocannon),
 * reading the sheet list, reading one sheet, and saving (each client to its own sheet, so every
 * save is a real new revision, never a 409). Runs the phases LOAD_ROUNDS times (default 3),
 * interleaved, and prints each round and the medians: requests per second, latency percentiles,
 * errors, and the machine's load average before each phase (the figures are only comparable at
 * a similar load). LOAD_SECONDS sets each phase's length (default 10); LOAD_PHASES picks phases
 * (comma-separated from list,sheet,saves); BASE_URL points it at a running app instead of
 * starting one on a fresh database.
 */
import { loadavg } from 'node:os';
import autocannon from 'autocannon';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from '../e2e/app-process';
import { createSheets, editorSession, type EditorSession } from './session';

const CLIENTS = 50;
const SECONDS = Number(process.env.LOAD_SECONDS ?? 10);
const ROUNDS = Number(process.env.LOAD_ROUNDS ?? 3);
const PHASES = new Set((process.env.LOAD_PHASES ?? 'list,sheet,saves').split(',').map((p) => p.trim()));

interface PhaseResult {
  phase: string;
  load1: number;
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

const median = (values: number[]) => percentile([...values].sort((a, b) => a - b), 50);

async function runPhase(phase: string, options: autocannon.Options): Promise<PhaseResult> {
  const times: number[] = [];
  let bytes = 0;
  const load1 = Math.round(loadavg()[0] * 100) / 100;
  const instance = autocannon({ connections: CLIENTS, duration: SECONDS, ...options });
  instance.on('response', (_client: autocannon.Client, _status: number, resBytes: number, responseTime: number) => {
    times.push(responseTime);
    bytes += resBytes;
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  return {
    phase,
    load1,
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

/** Each connection saves to a sheet of its own, rebasing on its own last save, starting from the sheet's latest revision now (a save cut off at the end of a round may have committed unseen). */
async function runSaves(baseUrl: string, session: EditorSession, sheetIds: string[]): Promise<PhaseResult> {
  const bases = await Promise.all(
    sheetIds.map(async (id) => ((await (await fetch(`${baseUrl}/api/sheets/${id}`, { headers: session.headers })).json()) as { sheet: { latestRevision: number } }).sheet.latestRevision),
  );
  let nextSheet = 0;
  return runPhase('saves', {
    url: baseUrl,
    method: 'POST',
    headers: session.headers,
    setupClient(client: autocannon.Client) {
      const index = nextSheet++ % sheetIds.length;
      // A request whose body is built anew before each send (autocannon's setupRequest), from this connection's own last revision.
      client.setRequests([
        {
          method: 'POST',
          path: `/api/sheets/${sheetIds[index]}/revisions`,
          headers: session.headers,
          setupRequest: (request) => ({ ...request, body: JSON.stringify({ baseRevision: bases[index], document: session.document, message: `load save on ${bases[index]}` }) }),
        },
      ]);
      client.on('response', (status: number) => {
        if (status === 201) bases[index]++;
      });
    },
  });
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
  for (let round = 1; round <= ROUNDS; round++) {
    const inRound: PhaseResult[] = [];
    if (PHASES.has('list')) inRound.push(await runPhase('sheet list', { url: `${baseUrl}/api/sheets`, headers: session.headers }));
    if (PHASES.has('sheet')) inRound.push(await runPhase('one sheet', { url: `${baseUrl}/api/sheets/${sheetIds[0]}`, headers: session.headers }));
    if (PHASES.has('saves')) inRound.push(await runSaves(baseUrl, session, sheetIds));
    console.log(`round ${round} of ${ROUNDS}`);
    console.table(inRound);
    results.push(...inRound);
  }

  const phases = [...new Set(results.map((r) => r.phase))];
  const medians = phases.map((phase) => {
    const of = results.filter((r) => r.phase === phase);
    const pick = (key: keyof Omit<PhaseResult, 'phase'>) => median(of.map((r) => r[key]));
    return {
      phase,
      load1: pick('load1'),
      perSecond: pick('perSecond'),
      p50: pick('p50'),
      p95: pick('p95'),
      p99: pick('p99'),
      errors: of.reduce((sum, r) => sum + r.errors, 0),
      non2xx: of.reduce((sum, r) => sum + r.non2xx, 0),
      meanBytes: pick('meanBytes'),
    };
  });
  console.log(`${CLIENTS} clients, ${SECONDS} s per phase, medians of ${ROUNDS} rounds (errors and non-2xx summed), against ${baseUrl}`);
  console.table(medians);
  const failed = results.filter((r) => r.errors || r.non2xx);
  if (failed.length) {
    console.error(`Errors or non-2xx answers in: ${[...new Set(failed.map((r) => r.phase))].join(', ')}`);
    process.exitCode = 1;
  }
} finally {
  await app?.stop();
}
