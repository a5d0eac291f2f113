import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_PASSWORD } from '../../src/lib/server/demo';
import { waitForMailboxMail } from '../helpers/mail';
import { baseUrl, launchBrowser, mailboxDir, saveScreenshot, signIn } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('a checker on a sheet', () => {
  it('remarks, resolves the remark, signs the revision as checked, and the title block shows who checked it and when; the author is mailed; a viewer can only read', async () => {
    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signIn(page, 'reviewer@tarnwhistle.example', DEMO_PASSWORD);
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const list = await (await page.request.get(`${baseUrl()}/api/sheets?team=${me.currentTeam}&q=${encodeURIComponent('Capsule pin')}`)).json();
    const sheet = list.items[0] as { id: string; title: string; latestRevision: number };

    await page.goto(`${baseUrl()}/sheets/${sheet.id}`, { waitUntil: 'networkidle' });
    const panel = page.locator('[data-review-panel]');
    await panel.scrollIntoViewIfNeeded();
    // The status is fetched by the island, so seeing it means the island is live.
    // The panel hydrates when the page is idle, which a busy machine can put off for many seconds.
    await expect.poll(() => panel.locator('[data-review-status]').innerText(), { timeout: 30_000 }).toMatch(/Status: (draft|checked|returned for correction)/);
    await panel.getByLabel('about').selectOption('results');
    await panel.locator('textarea').fill('Roll rates checked against $\\dot\\theta = v_t / r$; within limits.');
    await panel.getByRole('button', { name: 'Add remark' }).click();
    await expect.poll(() => panel.locator('[data-comment]').count()).toBe(1);
    await expect.poll(() => panel.locator('[data-comment] [data-remark-body] .katex').count()).toBeGreaterThan(0);
    await panel.locator('[data-comment]').getByRole('button', { name: 'Resolve' }).click();
    await expect.poll(() => panel.locator('[data-comment]').getAttribute('data-resolved')).toBe('true');
    await panel.getByRole('button', { name: /Sign rev \d+ as checked/ }).click();

    // Signing loads the page again, so the title block reads the signature.
    await expect.poll(() => page.locator('[data-title-block] [data-checked-by]').innerText(), { timeout: 15_000 }).toBe('Mei Arroyo');
    const today = new Date().toISOString().slice(0, 10);
    await expect(page.locator('[data-title-block] [data-checked-on]').innerText()).resolves.toBe(today);
    await expect(page.locator('[data-title-block] [data-review-state]').innerText()).resolves.toBe('checked');
    await page.locator('[data-review-panel]').scrollIntoViewIfNeeded();
    await expect.poll(() => page.locator('[data-review-panel] [data-last-checked]').innerText()).toMatch(/last checked revision \d+/);
    await saveScreenshot(page, 'revision-checked');

    const mail = await waitForMailboxMail(mailboxDir(), 'editor@tarnwhistle.example', { subject: `Checked: ${sheet.title}, rev ${sheet.latestRevision}` });
    expect(mail.text).toContain(`Mei Arroyo signed revision ${sheet.latestRevision} of "${sheet.title}" as checked.`);

    const viewer = await browser.newPage();
    await signIn(viewer, 'viewer@tarnwhistle.example', DEMO_PASSWORD);
    await viewer.goto(`${baseUrl()}/sheets/${sheet.id}`, { waitUntil: 'networkidle' });
    const viewerPanel = viewer.locator('[data-review-panel]');
    await viewerPanel.scrollIntoViewIfNeeded();
    await expect.poll(() => viewerPanel.locator('[data-comment]').count()).toBe(1);
    expect(await viewerPanel.locator('textarea').count()).toBe(0);
    await page.close();
    await viewer.close();
  });
});
