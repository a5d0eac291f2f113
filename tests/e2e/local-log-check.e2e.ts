import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { runSheet } from '../../src/lib/kinematics/index';
import { runLogCsv } from '../../src/lib/logs/generate';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { parseSheet } from '../../src/lib/sheet/schema';
import { baseUrl, launchBrowser, SCREENSHOT_DIR, signIn } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

// Long enough (a few seconds) that the worker reports progress, which it posts at most ten times a second.
const SAMPLES = 120_000;
const DEMO_SHEET_TITLE = 'Bearing housing: index a quarter turn';

describe('checking a local log in the browser', () => {
  it('the reviewer picks a gzip log generated from the sheet\'s run, sees progress, cancels, runs again to the verdict, and nothing is sent to the server', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@tarnwhistle.example', DEMO_PASSWORD);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}`)).json();
    // A demo sheet whose own run stays in rolling contact from its first sample, so its log passes.
    const sheetId = (list.items as { id: string; title: string }[]).find((item) => item.title === DEMO_SHEET_TITLE)!.id;
    const sheet = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}`)).json();
    const parsed = parseSheet(sheet.revision.inputs);
    if (!parsed.ok) throw new Error('the demo sheet does not parse');
    const doc = parsed.doc;
    const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: SAMPLES, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
    // Named .csv although gzip: the worker goes by the file's first bytes.
    const log = gzipSync(runLogCsv(doc, record));

    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const sent: string[] = [];
    page.on('request', (request) => {
      if (request.method() !== 'GET') sent.push(`${request.method()} ${request.url()}`);
    });
    const check = page.locator('[data-local-log-check]');
    await check.scrollIntoViewIfNeeded();
    expect(await check.textContent()).toContain('nothing is uploaded or stored');
    await check.locator('[data-local-log-input]').setInputFiles({ name: 'bench-replay.csv', mimeType: 'text/csv', buffer: log });
    await expect.poll(() => check.locator('[data-mapping-form]').count(), { timeout: 20_000 }).toBe(1);
    // The header was read through the decompression and the mapping prefilled from the generator's column names.
    expect(await check.getByLabel('Time column').inputValue()).toBe('t');
    expect(await check.getByLabel('Quaternion w column').inputValue()).toBe('qw');
    expect(await check.locator('[data-safety-caution]').count()).toBe(1);
    await expect.poll(() => check.locator('[data-run-comparison]').count(), { timeout: 20_000 }).toBe(1);

    // Cancel at once (the whole check takes only seconds): the panel says how far it got and shows no verdict.
    await check.locator('[data-run-comparison]').click();
    await check.getByRole('button', { name: 'Cancel' }).click();
    await check.locator('[data-testid="job-cancelled"]').waitFor({ timeout: 10_000 });
    expect(await check.locator('[data-testid="job-cancelled"]').textContent()).toMatch(/Cancelled (after [\d,]+ of [\d,]+ bytes|before the first progress report)\./);
    expect(await check.locator('[data-verdict]').count()).toBe(0);
    await check.screenshot({ path: join(SCREENSHOT_DIR, 'local-log-check-cancelled.png') });

    // Run again (in a fresh worker, since the cancelled job may still be winding down) to the end, with progress on the way.
    await check.locator('[data-run-comparison]').click();
    await check.locator('[data-job-detail]').waitFor({ state: 'attached', timeout: 60_000 });
    expect(await check.locator('[data-job-detail]').textContent()).toMatch(/samples\/s/);

    await expect.poll(() => check.locator('[data-verdict]').count(), { timeout: 120_000 }).toBe(1);
    // A log written from the sheet's own run agrees with the sheet (tests/unit/logs/compare.test.ts shows why).
    expect(await check.locator('[data-verdict]').getAttribute('data-verdict')).toBe('pass');
    expect(await check.locator('[data-verdict]').textContent()).toContain(`${record.tickCount} samples`);
    const detail = check.locator('[data-local-check-detail]');
    const messages = Number(await detail.getAttribute('data-progress-messages'));
    const seconds = Number(/ in ([\d.]+) s$/.exec((await detail.textContent()) ?? '')?.[1]);
    expect(messages).toBeGreaterThan(0);
    // At most about ten a second.
    expect(messages).toBeLessThanOrEqual(10 * seconds + 1);
    await check.screenshot({ path: join(SCREENSHOT_DIR, 'local-log-check.png') });
    expect(sent).toEqual([]);
    await page.close();
  }, 240_000);
});
