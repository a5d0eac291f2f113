import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launchBrowser, saveScreenshot, signIn } from './browser';

// The viewer's demo password is changed and then restored, so files that run later still sign in with it.
const EMAIL = 'viewer@tarnwhistle.example';
const DEMO_PASSWORD = 'slipless-demo';
const NEW_PASSWORD = 'copper pulley lantern';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

async function changePassword(page: Page, current: string, next: string): Promise<void> {
  await page.goto(`${baseUrl()}/account`, { waitUntil: 'networkidle' });
  const form = page.getByRole('form', { name: 'Change password' });
  await form.getByLabel('Current password').fill(current);
  await form.getByLabel('New password').fill(next);
  await form.getByRole('button', { name: 'Change password' }).click();
  await form.getByRole('status').waitFor();
}

async function isSignedOut(page: Page, path: string): Promise<boolean> {
  await page.goto(`${baseUrl()}${path}`);
  return new URL(page.url()).pathname === '/sign-in';
}

describe('password change', () => {
  it('signs out every session of the account, this one included; only the new password signs in again', async () => {
    const elsewhere = await (await browser.newContext()).newPage();
    const here = await (await browser.newContext({ viewport: { width: 1280, height: 900 } })).newPage();
    await signIn(elsewhere, EMAIL, DEMO_PASSWORD);
    await signIn(here, EMAIL, DEMO_PASSWORD);
    expect(await isSignedOut(elsewhere, '/sheets')).toBe(false);

    await changePassword(here, DEMO_PASSWORD, NEW_PASSWORD);
    await expect(here.getByRole('status').innerText()).resolves.toMatch(/Every session has been signed out, this one included/);
    await saveScreenshot(here, 'account-password-changed');
    expect(await isSignedOut(elsewhere, '/sheets')).toBe(true);
    expect(await isSignedOut(here, '/account')).toBe(true);

    await here.getByLabel('E-mail', { exact: true }).fill(EMAIL);
    await here.getByLabel('Password', { exact: true }).fill(DEMO_PASSWORD);
    await here.getByRole('button', { name: 'Sign in', exact: true }).click();
    await expect(here.getByText('That e-mail and password do not match an account.').waitFor()).resolves.toBeUndefined();

    await signIn(here, EMAIL, NEW_PASSWORD);
    expect(await isSignedOut(here, '/account')).toBe(false);
    await changePassword(here, NEW_PASSWORD, DEMO_PASSWORD);
    await signIn(elsewhere, EMAIL, DEMO_PASSWORD);
    expect(await isSignedOut(elsewhere, '/sheets')).toBe(false);
  });
});
