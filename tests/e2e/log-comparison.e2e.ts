import { join } from 'node:path';
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

const FILE_NAME = 'fenwick-line4-replay.csv';

describe('comparing a controller log with the sheet', () => {
  it('the reviewer uploads a log generated from the sheet\'s run, compares with the prefilled mapping, and sees the verdict and a plot', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@fenwick.example', DEMO_PASSWORD);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}`)).json();
    const sheetId = list.items[0].id as string;
    const sheet = await (await page.request.get(`${baseUrl()}/api/sheets/${sheetId}`)).json();
    const parsed = parseSheet(sheet.revision.inputs);
    if (!parsed.ok) throw new Error('the demo sheet does not parse');
    const doc = parsed.doc;
    const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: 200, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
    const log = Buffer.from(runLogCsv(doc, record));

    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const panel = page.locator('[data-logs-panel]');
    await panel.scrollIntoViewIfNeeded();
    await panel.locator('[data-log-input]').setInputFiles({ name: FILE_NAME, mimeType: 'text/csv', buffer: log });
    const row = panel.locator('[data-log]', { hasText: FILE_NAME });
    await expect.poll(() => row.count(), { timeout: 30_000 }).toBe(1);
    await row.locator('[data-compare-log]').click();

    const comparison = row.locator('[data-log-comparison]');
    await expect.poll(() => comparison.locator('[data-mapping-form]').count(), { timeout: 20_000 }).toBe(1);
    // Prefilled from the column names the generator writes.
    expect(await comparison.getByLabel('Time column').inputValue()).toBe('t');
    expect(await comparison.getByLabel('Quaternion w column').inputValue()).toBe('qw');
    expect(await comparison.locator('[data-safety-caution]').count()).toBe(1);
    await comparison.locator('[data-run-comparison]').click();
    await expect.poll(() => comparison.locator('[data-verdict]').count(), { timeout: 60_000 }).toBe(1);
    expect(['pass', 'fail']).toContain(await comparison.locator('[data-verdict]').getAttribute('data-verdict'));
    expect(await comparison.locator('[data-joint-table] tbody tr').count()).toBeGreaterThan(0);
    await expect.poll(() => comparison.locator('[data-comparison-charts] canvas').count()).toBeGreaterThan(0);
    await comparison.screenshot({ path: join(SCREENSHOT_DIR, 'log-comparison.png') });
    // The mapping table of a nine-joint hand is wider than the panel: it scrolls inside it rather than spilling past its border.
    const comparisonRight = await comparison.evaluate((el) => el.getBoundingClientRect().right);
    const panelRight = await panel.evaluate((el) => el.getBoundingClientRect().right);
    expect(comparisonRight).toBeLessThanOrEqual(panelRight);

    // Deleting the log takes its comparisons with it.
    await row.getByRole('button', { name: 'Delete' }).click();
    await expect.poll(() => panel.locator('[data-log]', { hasText: FILE_NAME }).count()).toBe(0);
    await page.close();
  });
});
