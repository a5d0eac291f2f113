import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { linkIn, waitForMailboxMail } from '../helpers/mail';
import { baseUrl, launchBrowser, mailboxDir, saveScreenshot } from './browser';

const OWNER = { email: 'owner@tarnwhistle.example', password: 'slipless-demo' };
const INVITEE = { email: 'reviewer2@tarnwhistle.example', name: 'Ines Haverkamp', password: 'roller pivot checks' };

let browser: Browser;
let ownerContext: BrowserContext;
let reviewerContext: BrowserContext;
let ownerPage: Page;
let reviewerPage: Page;
let invitationLink: string;

/** Signs in through the sign-in form and waits for the home page. */
async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' });
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL(`${baseUrl()}/`);
}

beforeAll(async () => {
  browser = await launchBrowser();
  ownerContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  reviewerContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  ownerPage = await ownerContext.newPage();
  reviewerPage = await reviewerContext.newPage();
});

afterAll(async () => {
  await browser?.close();
});

describe('inviting a reviewer by e-mail', () => {
  it('signs the demo owner in on /sign-in', async () => {
    await signIn(ownerPage, OWNER.email, OWNER.password);
    expect(await ownerPage.getByTestId('current-team').innerText()).toMatch(/owner/i);
  });

  it('invites reviewer2@tarnwhistle.example as reviewer from the team members page', async () => {
    await ownerPage.goto(`${baseUrl()}/team/members`, { waitUntil: 'networkidle' });
    const form = ownerPage.getByRole('form', { name: 'Invite someone by e-mail' });
    await form.getByLabel('E-mail').fill(INVITEE.email);
    await form.getByLabel('Role').selectOption('reviewer');
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await expect(form.getByRole('status').innerText()).resolves.toContain(`Invitation sent to ${INVITEE.email}`);
    await saveScreenshot(ownerPage, 'invitation-1-members-invited');
  });

  it('mails the invitation link to the invited address only (the mailbox folder of whoever runs the server)', async () => {
    const mail = await waitForMailboxMail(mailboxDir(), INVITEE.email);
    expect(mail.text).toContain('as reviewer');
    invitationLink = linkIn(mail.text, '/invite/inv_').href;
    expect(invitationLink.startsWith(`${baseUrl()}/invite/inv_`)).toBe(true);
  });

  it('opens the link, shows team and role, checks fields, accepts and lands signed in', async () => {
    await reviewerPage.goto(invitationLink, { waitUntil: 'networkidle' });
    const details = await reviewerPage.getByTestId('invitation-details').innerText();
    expect(details).toContain('Tarnwhistle Grip Works');
    expect(details).toMatch(/reviewer/i);

    await reviewerPage.getByLabel('Password').fill('short');
    await reviewerPage.getByRole('button', { name: 'Create account and join' }).click();
    await expect(reviewerPage.locator('#name-error').innerText()).resolves.toBe('Enter your name.');
    await expect(reviewerPage.locator('#password-error').innerText()).resolves.toBe('Use at least 10 characters.');
    await saveScreenshot(reviewerPage, 'invitation-3-accept-errors');

    await reviewerPage.getByLabel('Your name').fill(INVITEE.name);
    await reviewerPage.getByLabel('Password').fill(INVITEE.password);
    await reviewerPage.getByRole('button', { name: 'Create account and join' }).click();
    await reviewerPage.waitForURL(`${baseUrl()}/`);
    await reviewerPage.waitForLoadState('networkidle');
    expect(await reviewerPage.locator('header').innerText()).toContain(INVITEE.name);
    expect(await reviewerPage.getByTestId('current-team').innerText()).toMatch(/reviewer/i);
    await saveScreenshot(reviewerPage, 'invitation-4-signed-in');

    const me = await (await reviewerContext.request.get(`${baseUrl()}/api/me`)).json();
    expect(me.user.email).toBe(INVITEE.email);
    expect(me.teams).toEqual([expect.objectContaining({ role: 'reviewer' })]);
  });

  it('refuses the same link a second time with a clear message', async () => {
    const again = await browser.newPage();
    const response = await again.goto(invitationLink, { waitUntil: 'networkidle' });
    expect(response?.status()).toBe(410);
    expect(await again.getByRole('alert').innerText()).toBe('This invitation was already used.');
    await saveScreenshot(again, 'invitation-5-link-used');
    await again.close();
  });

  it('the reviewer cannot save a sheet: POST /api/sheets/{id}/revisions answers 403', async () => {
    const list = await (await reviewerContext.request.get(`${baseUrl()}/api/sheets`)).json();
    const sheet = list.items[0];
    expect(sheet?.id).toBeTruthy();
    const saved = await reviewerContext.request.post(`${baseUrl()}/api/sheets/${sheet.id}/revisions`, {
      data: { baseRevision: sheet.latestRevision ?? 1, document: {} },
    });
    expect(saved.status()).toBe(403);
  });
});

describe('resetting a forgotten password by e-mail', () => {
  it('asks from the sign-in page, follows the mailed link and lands signed in with the new password', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' });
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.waitForURL(`${baseUrl()}/reset-password`);
    await page.waitForLoadState('networkidle');
    await page.getByLabel('E-mail').fill('not an address');
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    await expect(page.locator('#email-error').innerText()).resolves.toMatch(/e-mail address/);
    await page.getByLabel('E-mail').fill(INVITEE.email);
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    await expect(page.getByRole('status').innerText()).resolves.toMatch(/^If an account uses that address/);
    await saveScreenshot(page, 'password-reset-1-asked');

    const mail = await waitForMailboxMail(mailboxDir(), INVITEE.email, { subject: 'Reset your Slipless password' });
    const resetLink = linkIn(mail.text, '/reset-password/pwr_').href;
    expect(resetLink.startsWith(`${baseUrl()}/reset-password/pwr_`)).toBe(true);

    await page.goto(resetLink, { waitUntil: 'networkidle' });
    await page.getByLabel(/^New password/).fill('a new roller password');
    await saveScreenshot(page, 'password-reset-2-new-password');
    await page.getByRole('button', { name: 'Set the new password and sign in' }).click();
    await page.waitForURL(`${baseUrl()}/`);
    expect(await page.locator('header').innerText()).toContain(INVITEE.name);

    const reused = await page.goto(resetLink);
    expect(reused?.status()).toBe(410);
    expect(await page.getByRole('alert').innerText()).toMatch(/^This reset link was already used/);
    await context.close();
  });
});
