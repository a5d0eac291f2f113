import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from './app-process';
import { launchBrowser } from './browser';

let browser: Browser;
let app: AppProcess | undefined;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await app?.stop();
  await browser?.close();
});

describe('restart', () => {
  it('keeps a signed-in session across a restart of the app on the same database, with the secret kept there', async () => {
    // Without AUTH_SECRET in the environment the app generates one on first start and keeps it in the database.
    const { AUTH_SECRET: _ignored, ...env } = process.env;
    const port = await freePort();
    const databaseUrl = tempDatabaseUrl();
    app = await startApp({ port, databaseUrl, env });
    const page = await browser.newPage();
    await page.goto(`${app.baseUrl}/sign-in`, { waitUntil: 'networkidle' });
    await page.getByLabel('E-mail', { exact: true }).fill('editor@tarnwhistle.example');
    await page.getByLabel('Password', { exact: true }).fill('slipless-demo');
    await page.getByRole('button', { name: 'Sign in', exact: true }).click();
    await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
    const before = await page.request.get(`${app.baseUrl}/api/me`);
    expect(before.status()).toBe(200);

    await app.stop();
    app = await startApp({ port, databaseUrl, env });
    const after = await page.request.get(`${app.baseUrl}/api/me`);
    expect(after.status()).toBe(200);
    expect(await after.json()).toMatchObject({ via: 'session', user: { email: 'editor@tarnwhistle.example' } });
    await page.goto(`${app.baseUrl}/account`);
    expect(new URL(page.url()).pathname).toBe('/account');
  });
});
