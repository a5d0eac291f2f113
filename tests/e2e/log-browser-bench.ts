/**
 * A 1,000,000-sample controller log of a three-finger demo sheet checked in the browser (a script,
 * not a test: timings on a shared machine are too noisy to assert). Builds the app when the build
 * is missing or older than the sources, starts it on its own database, writes the log of the
 * sheet's own run to a temporary file row block by row block, picks it in the sheet page's "Check a
 * local log in this browser" in Debian's Chromium, and prints the wall time from Compare to the
 * verdict, samples per second, the progress messages the worker posted, and the peaks of the page's
 * and the worker's JS heaps (CDP Runtime.getHeapUsage, sampled every HEAP_SAMPLE_MS).
 *
 *   npm run bench:log-browser [-- samples=1000000] [-- gzip]
 */
import { closeSync, createReadStream, createWriteStream, openSync, rmSync, statSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import type { CDPSession } from 'playwright-core';
import { runSheet } from '../../src/lib/kinematics/index';
import { runLogHeader, runLogRow } from '../../src/lib/logs/generate';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { parseSheet } from '../../src/lib/sheet/schema';
import { freePort, makeTempDir, tempDatabaseUrl } from '../helpers/temp';
import { ensureBuiltAppAndBrowser, startApp } from './app-process';
import { launchBrowser } from './browser';
import { cookieHeader, signInOverHttp } from './http-session';

const HEAP_SAMPLE_MS = 100;
const ROWS_PER_WRITE = 2000;
// A demo sheet of three fingers (nine joints) whose own run stays in rolling contact, so its log passes.
const SHEET_TITLE = 'Bearing housing: index a quarter turn';

const option = (name: string) => process.argv.slice(2).find((arg) => arg === name || arg.startsWith(`${name}=`));
const samples = Number(option('samples')?.split('=')[1] ?? 1_000_000);
const gzip = option('gzip') !== undefined;
const MIB = 1024 * 1024;

ensureBuiltAppAndBrowser();

const app = await startApp({ port: await freePort(), databaseUrl: tempDatabaseUrl(), env: { ...process.env, AUTH_SECRET: 'log-browser-bench-secret-0123456789abcdef' } });
const folder = makeTempDir('slipless-log-bench-');
const browser = await launchBrowser();
try {
  const { jar } = await signInOverHttp(app.baseUrl, app.baseUrl, 'reviewer@tarnwhistle.example', DEMO_PASSWORD);
  const get = async (path: string) => (await fetch(`${app.baseUrl}${path}`, { headers: { cookie: cookieHeader(jar) } })).json();
  const me = await get('/api/me');
  const list = await get(`/api/sheets?team=${me.currentTeam}`);
  const sheetId = (list.items as { id: string; title: string }[]).find((item) => item.title === SHEET_TITLE)?.id;
  if (!sheetId) throw new Error(`the demo team has no sheet "${SHEET_TITLE}"`);
  const parsed = parseSheet((await get(`/api/sheets/${sheetId}`)).revision.inputs);
  if (!parsed.ok) throw new Error('the demo sheet does not parse');
  const doc = parsed.doc;

  let started = performance.now();
  const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: samples, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
  const csvPath = join(folder, 'bench-log.csv');
  const descriptor = openSync(csvPath, 'w');
  writeSync(descriptor, `${runLogHeader(doc).join(',')}\n`);
  for (let tick = 0; tick < record.tickCount; tick += ROWS_PER_WRITE) {
    const lines: string[] = [];
    for (let k = tick; k < Math.min(record.tickCount, tick + ROWS_PER_WRITE); k++) lines.push(runLogRow(record, k).join(','));
    writeSync(descriptor, `${lines.join('\n')}\n`);
  }
  closeSync(descriptor);
  let logPath = csvPath;
  if (gzip) {
    logPath = join(folder, 'bench-log.csv.gz');
    await pipeline(createReadStream(csvPath), createGzip(), createWriteStream(logPath));
  }
  const fileBytes = statSync(logPath).size;
  console.log(`log: ${record.tickCount.toLocaleString('en')} samples, ${doc.hand.fingers.length} fingers, ${(fileBytes / MIB).toFixed(1)} MiB${gzip ? ` gzip (${(statSync(csvPath).size / MIB).toFixed(1)} MiB of text)` : ''}, written in ${((performance.now() - started) / 1000).toFixed(1)} s`);

  const context = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
  await context.addCookies([...jar].map(([name, value]) => ({ name, value, url: app.baseUrl })));
  const page = await context.newPage();
  await page.goto(`${app.baseUrl}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
  const check = page.locator('[data-local-log-check]');
  await check.locator('[data-local-log-input]').setInputFiles(logPath);
  await check.locator('[data-run-comparison]').waitFor({ timeout: 60_000 });

  // Heap sampling: the page through its own CDP session, the worker through the browser's (Target.sendMessageToTarget).
  const pageSession = await context.newCDPSession(page);
  const browserSession: CDPSession = await browser.newBrowserCDPSession();
  let workerSession: string | null = null;
  let messageId = 0;
  const pending = new Map<number, (usage: { usedSize: number; totalSize: number }) => void>();
  browserSession.on('Target.receivedMessageFromTarget', (event: { sessionId: string; message: string }) => {
    const reply = JSON.parse(event.message) as { id?: number; result?: { usedSize: number; totalSize: number } };
    if (reply.id !== undefined && reply.result) pending.get(reply.id)?.(reply.result);
  });
  const peaks = { pageUsed: 0, pageTotal: 0, workerUsed: 0, workerTotal: 0, workerSamples: 0 };
  const workerHeap = async () => {
    if (workerSession === null) {
      const { targetInfos } = (await browserSession.send('Target.getTargets')) as { targetInfos: { targetId: string; type: string; url: string }[] };
      const target = targetInfos.find((t) => t.type === 'worker' && t.url.includes('log-compare'));
      if (!target) return;
      workerSession = ((await browserSession.send('Target.attachToTarget', { targetId: target.targetId, flatten: false })) as { sessionId: string }).sessionId;
    }
    const id = ++messageId;
    const usage = await new Promise<{ usedSize: number; totalSize: number } | null>((resolve) => {
      pending.set(id, resolve);
      void browserSession.send('Target.sendMessageToTarget', { sessionId: workerSession!, message: JSON.stringify({ id, method: 'Runtime.getHeapUsage' }) });
      setTimeout(() => resolve(null), 2000);
    });
    pending.delete(id);
    if (!usage) return;
    peaks.workerUsed = Math.max(peaks.workerUsed, usage.usedSize);
    peaks.workerTotal = Math.max(peaks.workerTotal, usage.totalSize);
    peaks.workerSamples++;
  };
  let sampling = true;
  const sampler = (async () => {
    while (sampling) {
      const usage = (await pageSession.send('Runtime.getHeapUsage')) as { usedSize: number; totalSize: number };
      peaks.pageUsed = Math.max(peaks.pageUsed, usage.usedSize);
      peaks.pageTotal = Math.max(peaks.pageTotal, usage.totalSize);
      await workerHeap();
      await new Promise((resolve) => setTimeout(resolve, HEAP_SAMPLE_MS));
    }
  })();

  started = performance.now();
  await check.locator('[data-run-comparison]').click();
  await check.locator('[data-verdict]').waitFor({ timeout: 30 * 60_000 });
  const wallMs = performance.now() - started;
  sampling = false;
  await sampler;

  const verdict = await check.locator('[data-verdict]').getAttribute('data-verdict');
  const detailLine = check.locator('[data-local-check-detail]');
  const detail = (await detailLine.textContent()) ?? '';
  const messages = Number(await detailLine.getAttribute('data-progress-messages'));
  const workerSeconds = Number(/ in ([\d.]+) s$/.exec(detail)?.[1]);
  console.log(`verdict: ${verdict}; worker's own account: ${detail}`);
  console.log(`wall time, Compare to verdict: ${(wallMs / 1000).toFixed(1)} s`);
  console.log(`samples/s (wall): ${Math.round(record.tickCount / (wallMs / 1000)).toLocaleString('en')}`);
  console.log(`progress messages: ${messages} in ${workerSeconds} s (${(messages / workerSeconds).toFixed(1)} per second)`);
  console.log(`page JS heap peak: ${(peaks.pageUsed / MIB).toFixed(1)} MiB used, ${(peaks.pageTotal / MIB).toFixed(1)} MiB allocated`);
  console.log(
    peaks.workerSamples > 0
      ? `worker JS heap peak: ${(peaks.workerUsed / MIB).toFixed(1)} MiB used, ${(peaks.workerTotal / MIB).toFixed(1)} MiB allocated (${peaks.workerSamples} samples every ${HEAP_SAMPLE_MS} ms)`
      : 'worker JS heap: not sampled (the worker target was not found)',
  );
  await context.close();
} finally {
  await browser.close();
  await app.stop();
  rmSync(folder, { recursive: true, force: true });
}
