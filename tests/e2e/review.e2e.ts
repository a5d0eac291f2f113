import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { baseUrl, launchBrowser, saveScreenshot, signIn } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('a reviewer on a sheet', () => {
  it('comments, approves the revision and sees the status change; a viewer can only read', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@fenwick.example', DEMO_PASSWORD);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent('Capsule pin')}`)).json();
    const sheetId = list.items[0].id as string;

    await page.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const panel = page.locator('[data-review-panel]');
    await panel.scrollIntoViewIfNeeded();
    // The status is fetched by the island, so seeing it means the island is live.
    await expect.poll(() => panel.locator('[data-review-status]').innerText()).toMatch(/Status: (draft|approved|changes-requested)/);
    await panel.locator('textarea').fill('Roll rates checked against the hand calculation; within limits.');
    await panel.getByRole('button', { name: 'Comment' }).click();
    await expect.poll(() => panel.locator('[data-comment]').count()).toBe(1);
    await panel.getByRole('button', { name: /Approve revision/ }).click();
    await expect.poll(() => panel.locator('[data-review-status]').innerText()).toContain('approved');
    await expect.poll(() => panel.locator('[data-last-checked]').innerText()).toMatch(/last approved revision \d+/);
    await saveScreenshot(page, 'review-approved');
    // The title block states the latest revision's review state once the page is loaded again.
    await page.reload({ waitUntil: 'networkidle' });
    await expect(page.locator('[data-title-block] [data-review-state]').innerText()).resolves.toBe('approved');

    const viewer = await browser.newPage();
    await signIn(viewer, 'viewer@fenwick.example', DEMO_PASSWORD);
    await viewer.goto(`${baseUrl()}/sheets/${sheetId}`, { waitUntil: 'networkidle' });
    const viewerPanel = viewer.locator('[data-review-panel]');
    await viewerPanel.scrollIntoViewIfNeeded();
    await expect.poll(() => viewerPanel.locator('[data-comment]').count()).toBe(1);
    expect(await viewerPanel.locator('textarea').count()).toBe(0);
    await page.close();
    await viewer.close();
  });
});
