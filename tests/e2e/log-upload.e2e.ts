import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { join } from 'node:path';
import { baseUrl, launchBrowser, SCREENSHOT_DIR, signIn } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

/** A Tarnwhistle parcel-line controller log of `rows` samples, about 60 bytes a row. */
function tarnwhistleLog(rows: number): Buffer {
  const lines = ['t,px,py,pz,left_roll_cmd,left_roll_meas'];
  for (let i = 0; i < rows; i++) lines.push(`${(i * 0.001).toFixed(3)},0.1234,0.0567,0.1189,0.5123,${(0.51 + (i % 7) * 1e-3).toFixed(4)}`);
  return Buffer.from(`${lines.join('\n')}\n`);
}

describe('controller logs on the sheet page', () => {
  it('a reviewer uploads a log with a progress bar and sees it listed with its size; a viewer sees the list without the upload button', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@tarnwhistle.example', DEMO_PASSWORD);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}`)).json();
    const sheetId = list.items[0].id as string;
    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const panel = page.locator('[data-logs-panel]');
    await panel.scrollIntoViewIfNeeded();
    await expect.poll(() => panel.innerText()).toContain('No logs uploaded yet.');

    // Slow the upload to 2 MB/s (Chrome DevTools Protocol network throttling) so the progress bar is seen moving.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 2_000_000 });
    const log = tarnwhistleLog(100_000);
    await panel.locator('[data-log-input]').setInputFiles({ name: 'line4-run-12.csv', mimeType: 'text/csv', buffer: log });
    const progress = panel.locator('[data-upload-progress] progress');
    await expect.poll(async () => Number(await progress.getAttribute('value')), { timeout: 20_000 }).toBeGreaterThan(0);
    expect(Number(await progress.getAttribute('max'))).toBe(log.length);
    // The panel alone: the sheet page is long.
    await panel.screenshot({ path: join(SCREENSHOT_DIR, 'log-upload-progress.png') });
    await expect.poll(() => panel.locator('[data-log]').count(), { timeout: 30_000 }).toBe(1);
    const row = await panel.locator('[data-log]').innerText();
    expect(row).toContain('line4-run-12.csv');
    expect(row).toContain(`${+(log.length / 2 ** 20).toFixed(1)} MiB`);
    await panel.screenshot({ path: join(SCREENSHOT_DIR, 'log-upload-listed.png') });

    const viewer = await browser.newPage();
    await signIn(viewer, 'viewer@tarnwhistle.example', DEMO_PASSWORD);
    await viewer.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const viewerPanel = viewer.locator('[data-logs-panel]');
    await expect.poll(() => viewerPanel.locator('[data-log]').count()).toBe(1);
    expect(await viewerPanel.getByRole('button', { name: 'Upload a log' }).count()).toBe(0);
    expect(await viewerPanel.getByRole('button', { name: 'Delete' }).count()).toBe(0);
    await viewer.close();

    await panel.getByRole('button', { name: 'Delete' }).click();
    await expect.poll(() => panel.innerText()).toContain('No logs uploaded yet.');
    await page.close();
  });
});
