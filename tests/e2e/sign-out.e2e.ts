import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { baseUrl, launchBrowser, signIn } from './browser';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('signing out in the browser', () => {
  it('ends the session on the server: the session cookie copied before sign-out no longer signs anyone in', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await signIn(page, 'editor@tarnwhistle.example', 'slipless-demo');
    const copied = (await context.cookies()).filter((cookie) => cookie.name.endsWith('authjs.session-token'));
    expect(copied).toHaveLength(1);

    await page.goto(`${baseUrl()}/sign-out`, { waitUntil: 'networkidle' });
    await page.getByRole('button', { name: 'Sign out now' }).click();
    await page.waitForURL(`${baseUrl()}/`);
    expect((await context.request.get(`${baseUrl()}/api/me`)).status()).toBe(401);

    const thief = await browser.newContext();
    await thief.addCookies(copied);
    expect((await thief.request.get(`${baseUrl()}/api/me`)).status()).toBe(401);
    const account = await (await thief.newPage()).goto(`${baseUrl()}/account`);
    expect(new URL(account!.url()).pathname).toBe('/sign-in');
    await thief.close();
    await context.close();
  });
});
