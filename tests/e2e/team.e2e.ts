import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launchBrowser, saveScreenshot } from './browser';

let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByLabel('E-mail', { exact: true }).fill('owner@tarnwhistle.example');
  await page.getByLabel('Password', { exact: true }).fill('slipless-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(`${baseUrl()}/`);
});

afterAll(async () => {
  await browser?.close();
});

function callMe(token: string): Promise<Response> {
  return fetch(`${baseUrl()}/api/me`, { headers: { authorization: `Bearer ${token}` } });
}

describe('team and token pages', () => {
  it('shows the team members with editable roles and the owner tools', async () => {
    await page.getByRole('link', { name: 'Team' }).click();
    await page.waitForURL(`${baseUrl()}/team/members`);
    const members = page.getByTestId('member-list');
    await expect(members.getByText('owner@tarnwhistle.example').waitFor()).resolves.toBeUndefined();
    expect(await members.locator('tbody tr').count()).toBeGreaterThanOrEqual(4);
    expect(await page.getByLabel('Role of viewer@tarnwhistle.example').inputValue()).toBe('viewer');
    expect(await page.getByRole('link', { name: 'Audit trail' }).getAttribute('href')).toBe('/team/audit');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await expect(page.locator('#invite-email-error').innerText()).resolves.toMatch(/e-mail address/);
    await saveScreenshot(page, 'team-members');
  });

  it('creates a token, shows its secret once, and the secret works as a bearer until revoked', async () => {
    await page.goto(`${baseUrl()}/account/tokens`);
    await page.getByRole('button', { name: 'Create token' }).click();
    await expect(page.locator('#token-name-error').innerText()).resolves.toMatch(/Name the token/);

    await page.getByLabel('Name').fill('e2e log upload');
    await page.getByLabel('Role').selectOption('reviewer');
    await page.getByRole('button', { name: 'Create token' }).click();
    const secretBox = page.getByTestId('token-secret');
    await secretBox.waitFor();
    const token = await secretBox.inputValue();
    expect(token).toMatch(/^slp_[\w-]{43}$/);
    await expect(page.getByTestId('new-token').innerText()).resolves.toMatch(/only time it is shown/);
    await saveScreenshot(page, 'token-created');

    const me = await callMe(token);
    expect(me.status).toBe(200);
    expect(await me.json()).toMatchObject({ via: 'token', user: { email: 'owner@tarnwhistle.example' }, teams: [{ role: 'reviewer' }] });

    await page.getByRole('button', { name: 'I have stored it' }).click();
    await page.reload();
    const row = page.locator('tr[data-token-name="e2e log upload"]');
    await row.waitFor();
    expect(await page.content()).not.toContain(token);
    await expect(row.innerText()).resolves.toMatch(/active/);
    expect(await row.locator('td').nth(4).innerText()).not.toBe('never');

    await row.getByRole('button', { name: 'Revoke' }).click();
    await row.getByRole('button', { name: 'Revoke now' }).click();
    await row.getByText(/^revoked/).waitFor();
    await saveScreenshot(page, 'token-revoked');
    const after = await callMe(token);
    expect(after.status).toBe(401);
  });

  it('records the token in the audit trail and shows the account page', async () => {
    await page.goto(`${baseUrl()}/team/audit`);
    const audit = page.getByTestId('audit-table');
    await expect(audit.innerText()).resolves.toMatch(/Revoked API token[\s\S]*Created API token/);
    await saveScreenshot(page, 'team-audit');

    await page.goto(`${baseUrl()}/account`);
    await expect(page.getByTestId('account-name').innerText()).resolves.toBe('Priya Okafor');
    await expect(page.getByTestId('account-teams').innerText()).resolves.toMatch(/Tarnwhistle Grip Works[\s\S]*owner/i);
    await page.getByRole('button', { name: 'Change password' }).click();
    await expect(page.locator('#current-password-error').innerText()).resolves.toMatch(/current password/);
    await page.getByLabel('Current password').fill('not-my-password');
    await page.getByLabel('New password').fill('a-much-longer-password');
    await page.getByRole('button', { name: 'Change password' }).click();
    await expect(page.locator('#current-password-error').innerText()).resolves.toBe('That is not your current password.');
    await saveScreenshot(page, 'account');
  });

  it('lets the owner see and revoke a team token from the members page', async () => {
    const created = await page.evaluate(async () => {
      const teamId = (await (await fetch('/api/me')).json()).currentTeam;
      const response = await fetch('/api/tokens', {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ teamId, name: 'e2e team overview', role: 'viewer' }),
      });
      return { status: response.status, body: await response.json() };
    });
    expect(created.status).toBe(201);
    expect((await callMe(created.body.token)).status).toBe(200);

    await page.goto(`${baseUrl()}/team/members`);
    const row = page.getByTestId('team-token-list').locator('tr', { hasText: 'e2e team overview' });
    await row.waitFor();
    await expect(row.innerText()).resolves.toMatch(/owner@tarnwhistle\.example/);
    await saveScreenshot(page, 'team-tokens');
    await row.getByRole('button', { name: 'Revoke' }).click();
    await row.waitFor({ state: 'detached' });
    expect((await callMe(created.body.token)).status).toBe(401);
  });

  it('shows a viewer the members read-only and keeps the audit trail from them', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const viewer = await context.newPage();
    await viewer.goto(`${baseUrl()}/sign-in`);
    await viewer.getByLabel('E-mail', { exact: true }).fill('viewer@tarnwhistle.example');
    await viewer.getByLabel('Password', { exact: true }).fill('slipless-demo');
    await viewer.getByRole('button', { name: 'Sign in' }).click();
    await viewer.waitForURL(`${baseUrl()}/`);

    await viewer.goto(`${baseUrl()}/team/members`);
    await viewer.getByTestId('member-list').getByText('owner@tarnwhistle.example').waitFor();
    expect(await viewer.locator('select').count()).toBe(0);
    expect(await viewer.getByRole('link', { name: 'Audit trail' }).count()).toBe(0);
    expect(await viewer.getByRole('heading', { name: 'Invite someone' }).count()).toBe(0);
    await saveScreenshot(viewer, 'team-members-viewer');

    const audit = await viewer.goto(`${baseUrl()}/team/audit`);
    expect(audit?.status()).toBe(403);
    await expect(viewer.locator('main').innerText()).resolves.toMatch(/Only the team owner/);
    await context.close();
  });
});
