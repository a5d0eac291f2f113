import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { DEMO_PASSWORD, DEMO_TEAM } from '../../src/lib/server/demo';
import { baseUrl, launchBrowser, saveScreenshot, signIn, waitForHydration } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('team settings', () => {
  it('the owner renames the team, with the error shown next to a bad name; delete stays locked until the slug is typed', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 1000 } });
    await signIn(page, 'owner@tarnwhistle.example', DEMO_PASSWORD);
    await page.goto(`${baseUrl()}/team/members`, { waitUntil: 'networkidle' });
    const settings = page.getByRole('region', { name: 'Team settings' });
    await settings.scrollIntoViewIfNeeded();
    await waitForHydration(settings);
    const name = settings.getByLabel('Team name');
    await expect.poll(() => settings.getByRole('button', { name: 'Delete this team' }).isDisabled()).toBe(true);
    await name.fill('x');
    await settings.getByRole('button', { name: 'Rename' }).click();
    await expect.poll(() => settings.getByRole('alert').innerText()).toContain('at least 2 characters');
    await saveScreenshot(page, 'team-settings-error');
    await name.fill('Tarnwhistle Cell 4 (renamed)');
    await Promise.all([page.waitForEvent('load'), settings.getByRole('button', { name: 'Rename' }).click()]);
    await expect.poll(() => page.locator('h1').innerText()).toBe('Tarnwhistle Cell 4 (renamed)');
    await saveScreenshot(page, 'team-settings-renamed');
    const me = await (await page.request.get(`${baseUrl()}/api/me`)).json();
    const restore = await page.request.patch(`${baseUrl()}/api/teams/${me.currentTeam}`, { data: { name: DEMO_TEAM.name }, headers: { origin: baseUrl() } });
    expect(restore.status()).toBe(200);
    await page.close();
  });
});
