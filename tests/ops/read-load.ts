/**
 * `npx tsx tests/ops/read-load.ts [--base DIR] [--rounds N] [--profile DIR]`: the load script's two
 * read phases (50 clients on the sheet list, then on one sheet) against the built app, repeated for
 * N rounds (default 3), with the app's own CPU time per request read from /proc (steadier than
 * latency on a shared machine). `--base DIR` starts a second app from another checkout with its own
 * build and alternates the two in every round (before/after in one session); `--profile DIR` writes
 * each app's V8 CPU profile there on exit. Prints every phase, then the medians. LOAD_SECONDS sets
 * each phase's length (default 10).
 */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { parseArgs } from 'node:util';
import autocannon from 'autocannon';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from '../e2e/app-process';
import { createSheets, editorSession, type EditorSession } from './session';

const CLIENTS = 50;
const SECONDS = Number(process.env.LOAD_SECONDS ?? 10);
/** Linux reports process times in clock ticks of 1/100 s on every common architecture (common practice: USER_HZ = 100). */
const TICKS_PER_SECOND = 100;

const { values } = parseArgs({ options: { base: { type: 'string' }, rounds: { type: 'string', default: '3' }, profile: { type: 'string' } } });

interface Target {
  name: string;
  app: AppProcess;
  session: EditorSession;
  sheetId: string;
}

interface Row {
  app: string;
  phase: string;
  perSecond: number;
  p50: number;
  p95: number;
  cpuMsPerRequest: number;
  errors: number;
}

/** User plus system CPU time of a process so far, ms (fields 14 and 15 of /proc/PID/stat, after the parenthesised name). */
function cpuMs(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / TICKS_PER_SECOND;
}

function percentile(sorted: number[], p: number): number {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor((xs.length - 1) / 2)];

async function runPhase(target: Target, phase: string, url: string): Promise<Row> {
  const times: number[] = [];
  const before = cpuMs(target.app.pid!);
  const instance = autocannon({ url, connections: CLIENTS, duration: SECONDS, headers: target.session.headers });
  instance.on('response', (_client: autocannon.Client, _status: number, _bytes: number, responseTime: number) => times.push(responseTime));
  const result = await instance;
  const used = cpuMs(target.app.pid!) - before;
  times.sort((a, b) => a - b);
  return {
    app: target.name,
    phase,
    perSecond: Math.round(result.requests.total / SECONDS),
    p50: percentile(times, 50),
    p95: percentile(times, 95),
    cpuMsPerRequest: Math.round((used / Math.max(1, result.requests.total)) * 100) / 100,
    errors: result.errors + result.timeouts + result.non2xx,
  };
}

async function start(name: string, cwd: string | undefined): Promise<Target> {
  const nodeArgs = values.profile ? ['--cpu-prof', `--cpu-prof-dir=${resolve(values.profile, name)}`] : [];
  const env = { ...process.env, NODE_ENV: 'production' };
  const app = await startApp({ port: await freePort(), databaseUrl: tempDatabaseUrl(), env, singleProcess: true, cwd, nodeArgs });
  const session = await editorSession(app.baseUrl);
  // As many sheets as the load script makes, so the list reads the same page.
  const [sheetId] = await createSheets(app.baseUrl, session, CLIENTS, 'read load');
  return { name, app, session, sheetId };
}

const targets: Target[] = [];
try {
  targets.push(await start('this', undefined));
  if (values.base) targets.push(await start('base', resolve(values.base)));
  const rows: Row[] = [];
  const rounds = Number(values.rounds);
  for (let round = 0; round < rounds; round++) {
    // Alternate which app goes first, so neither always meets the machine in the same state.
    const order = round % 2 ? [...targets].reverse() : targets;
    for (const target of order) {
      rows.push(await runPhase(target, 'sheet list', `${target.app.baseUrl}/api/sheets`));
      rows.push(await runPhase(target, 'one sheet', `${target.app.baseUrl}/api/sheets/${target.sheetId}`));
    }
  }
  console.log(`${CLIENTS} clients, ${SECONDS} s per phase, ${rounds} rounds`);
  console.table(rows);
  const medians = targets.flatMap(({ name }) =>
    ['sheet list', 'one sheet'].map((phase) => {
      const mine = rows.filter((r) => r.app === name && r.phase === phase);
      return {
        app: name,
        phase,
        perSecond: median(mine.map((r) => r.perSecond)),
        p50: median(mine.map((r) => r.p50)),
        p95: median(mine.map((r) => r.p95)),
        cpuMsPerRequest: median(mine.map((r) => r.cpuMsPerRequest)),
        errors: mine.reduce((sum, r) => sum + r.errors, 0),
      };
    }),
  );
  console.log('Medians:');
  console.table(medians);
  if (rows.some((r) => r.errors)) {
    console.error('Errors or non-2xx answers during the read phases.');
    process.exitCode = 1;
  }
} finally {
  await Promise.all(targets.map((t) => t.app.stop()));
}
