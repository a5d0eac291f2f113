/**
 * How long a health check waits while the heaviest requests a client can send run on the built
 * app (a script, not a test: timings on a shared machine are too noisy to assert). Starts the app
 * on its own database, signs in as the demo editor, then runs each kind of request a few times in
 * a row while another process asks /api/health every 20 ms, and prints per kind the request's
 * median time and the health checks' median and worst wait.
 *
 *   npm run build && npm run measure:responsiveness [-- rounds=5]
 */
import { fork } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createClient } from '@libsql/client';
import { openDatabase } from '../../src/db';
import { MAX_JSON_VALUES } from '../../src/lib/server/json-depth';
import { largestSheet } from '../../src/lib/sheet/largest-sheet';
import { addRevisions } from '../helpers/revisions';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp } from './app-process';
import { cookieHeader, signInOverHttp } from './http-session';

const HEALTH_INTERVAL_MS = 20;
const EXTRA_REVISIONS = 5_000;

/** Runs inside the forked poller: asks for health every HEALTH_INTERVAL_MS and reports each wait. */
async function pollHealth(baseUrl: string): Promise<never> {
  for (;;) {
    const started = performance.now();
    await fetch(`${baseUrl}/api/health`).then((r) => r.arrayBuffer());
    process.send?.({ at: Date.now(), ms: performance.now() - started });
    await new Promise((r) => setTimeout(r, HEALTH_INTERVAL_MS));
  }
}

if (process.argv[2] === '--poll') await pollHealth(process.argv[3]);

const quantile = (values: number[], q: number) => [...values].sort((a, b) => a - b)[Math.min(values.length - 1, Math.floor(q * values.length))] ?? NaN;

const rounds = Number(process.argv[2] ?? 5);
const databaseUrl = tempDatabaseUrl();
const app = await startApp({ port: await freePort(), databaseUrl, env: { ...process.env, AUTH_SECRET: 'responsiveness-script-secret-0123456789' } });
const healthWaits: { at: number; ms: number }[] = [];
const poller = fork(process.argv[1], ['--poll', app.baseUrl], { execArgv: process.execArgv });
poller.on('message', (message) => healthWaits.push(message as { at: number; ms: number }));
while (healthWaits.length === 0) await new Promise((r) => setTimeout(r, 50));
try {
  const { jar } = await signInOverHttp(app.baseUrl, app.baseUrl, 'editor@tarnwhistle.example', 'slipless-demo');
  const headers = { origin: app.baseUrl, cookie: cookieHeader(jar), 'content-type': 'application/json' };
  const client = createClient({ url: databaseUrl });
  const [team] = (await client.execute("select id from teams where slug = 'tarnwhistle-cell4'")).rows as unknown as { id: string }[];
  client.close();

  const example = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
  const largest = largestSheet(example);
  const created = await fetch(`${app.baseUrl}/api/sheets`, { method: 'POST', headers, body: JSON.stringify({ teamId: team.id, title: 'Largest sheet', document: largest }) });
  if (created.status !== 201) throw new Error(`creating the largest sheet answered ${created.status}: ${await created.text()}`);
  const { sheetId } = (await created.json()) as { sheetId: string };
  const long = await fetch(`${app.baseUrl}/api/sheets`, { method: 'POST', headers, body: JSON.stringify({ teamId: team.id, title: 'Long history', document: example }) });
  const { sheetId: longSheetId } = (await long.json()) as { sheetId: string };
  const database = await openDatabase(databaseUrl);
  await addRevisions(database, longSheetId, EXTRA_REVISIONS, example);
  database.close();

  // Just under the value limit and near the import size limit: the most a refused import can cost.
  const padding = Object.fromEntries(Array.from({ length: MAX_JSON_VALUES - 2_000 }, (_, i) => [`unknownField${String(i).padStart(70, '0')}`, i]));
  const paddedFile = JSON.stringify({ ...example, ...padding });
  const definitions = Array.from({ length: 26 }, (_, i) => (i === 0 ? 'f0(t)=t' : `f${i}(t)=f${i - 1}(t)+f${i - 1}(t)`)).join(';');
  const attack = { ...example, variables: `x = ${definitions};f25(1)` };
  const fiftyMegabytes = new Uint8Array(50 * 1024 * 1024).fill(0x20);

  const kinds: [string, () => Promise<unknown>][] = [
    ['create the largest valid sheet', () => fetch(`${app.baseUrl}/api/sheets`, { method: 'POST', headers, body: JSON.stringify({ teamId: team.id, title: 'Largest again', document: largest }) })],
    [`import a refused ${(paddedFile.length / 1e6).toFixed(1)} MB file of ${MAX_JSON_VALUES - 2_000} extra fields`, () => fetch(`${app.baseUrl}/api/sheets/import`, { method: 'POST', headers, body: JSON.stringify({ teamId: team.id, fileName: 'padded.json', content: paddedFile }) })],
    ['save a doubling-definitions expression', () => fetch(`${app.baseUrl}/api/sheets`, { method: 'POST', headers, body: JSON.stringify({ teamId: team.id, title: 'Attack', document: attack }) })],
    ['report of the largest sheet', () => fetch(`${app.baseUrl}/sheets/${sheetId}/report`, { headers })],
    [`history page, ${EXTRA_REVISIONS + 1} revisions`, () => fetch(`${app.baseUrl}/sheets/${longSheetId}/history`, { headers })],
    [`revisions API, ${EXTRA_REVISIONS + 1} revisions`, () => fetch(`${app.baseUrl}/api/sheets/${longSheetId}/revisions`, { headers })],
    ['compare first and last revision', () => fetch(`${app.baseUrl}/sheets/${longSheetId}/compare?from=1&to=${EXTRA_REVISIONS + 1}`, { headers })],
    ['8 parallel anonymous 50 MB imports', () => Promise.all(Array.from({ length: 8 }, () => fetch(`${app.baseUrl}/api/sheets/import`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: fiftyMegabytes }).catch(() => undefined)))],
  ];

  console.log(`| request (${rounds} rounds each) | request median | health median | health worst | health checks |`);
  console.log('|---|---|---|---|---|');
  for (const [name, send] of kinds) {
    const times: number[] = [];
    const from = Date.now();
    for (let round = 0; round < rounds; round++) {
      const started = performance.now();
      const answer = await send();
      if (answer instanceof Response) await answer.arrayBuffer();
      times.push(performance.now() - started);
    }
    await new Promise((r) => setTimeout(r, 3 * HEALTH_INTERVAL_MS));
    const waits = healthWaits.filter((w) => w.at >= from).map((w) => w.ms);
    console.log(`| ${name} | ${quantile(times, 0.5).toFixed(0)} ms | ${quantile(waits, 0.5).toFixed(1)} ms | ${Math.max(...waits).toFixed(1)} ms | ${waits.length} |`);
  }
} finally {
  poller.kill();
  await app.stop();
}
