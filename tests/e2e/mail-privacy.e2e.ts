import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext } from 'playwright-core';
import { linkIn, waitForMailboxMail } from '../helpers/mail';
import { baseUrl, launchBrowser, mailboxDir, saveScreenshot, signIn } from './browser';

const OWNER = { email: 'owner@tarnwhistle.example', password: 'slipless-demo' };
const PERSON = { email: 'former-tester@tarnwhistle.example', name: 'Former Tester', password: 'a former tester password' };

/** A body-less DELETE says where it comes from, as a browser's fetch would. */
const sameOrigin = () => ({ origin: baseUrl() });

let browser: Browser;
let owner: BrowserContext;

beforeAll(async () => {
  browser = await launchBrowser();
  owner = await browser.newContext({ viewport: { width: 1280, height: 900 } });
});

afterAll(async () => {
  await browser?.close();
});

describe('a team owner never reads mail addressed to someone else', () => {
  it('invites, withdraws, a sign-in link is sent to that person: the owner cannot see it, the mailbox folder has it and it works for its addressee', async () => {
    const ownerPage = await owner.newPage();
    await signIn(ownerPage, OWNER.email, OWNER.password);
    const me = await (await owner.request.get(`${baseUrl()}/api/me`)).json();
    const teamId: string = me.currentTeam;
    const api = `${baseUrl()}/api/teams/${teamId}`;

    // The person gets an account through an invitation and leaves the team again.
    expect((await owner.request.post(`${api}/invitations`, { data: { email: PERSON.email, role: 'viewer' } })).status()).toBe(201);
    const token = linkIn((await waitForMailboxMail(mailboxDir(), PERSON.email)).text, '/invite/').pathname.split('/').pop();
    const newcomer = await browser.newContext();
    expect((await newcomer.request.post(`${baseUrl()}/api/invitations/accept`, { data: { token, name: PERSON.name, password: PERSON.password } })).status()).toBe(200);
    await newcomer.close();
    const { members } = await (await owner.request.get(`${api}/members`)).json();
    const person = (members as { userId: string; email: string }[]).find((m) => m.email === PERSON.email)!;
    expect((await owner.request.delete(`${api}/members/${person.userId}`, { headers: sameOrigin() })).status()).toBe(204);

    // Invited once more and withdrawn: before, this kept the address in the owner's outbox for good.
    const invited = await owner.request.post(`${api}/invitations`, { data: { email: PERSON.email, role: 'viewer' } });
    const { invitation } = await invited.json();
    expect((await owner.request.delete(`${api}/invitations/${invitation.id}`, { headers: sameOrigin() })).status()).toBe(204);

    const stranger = await browser.newContext();
    const signInPage = await stranger.newPage();
    await signInPage.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' });
    await signInPage.getByLabel('E-mail for sign-in link').fill(PERSON.email);
    await signInPage.getByRole('button', { name: 'Send link' }).click();
    await signInPage.getByRole('status').waitFor();
    const signInMail = await waitForMailboxMail(mailboxDir(), PERSON.email, { subject: 'Your Slipless sign-in link' });
    const signInLink = linkIn(signInMail.text, '/api/auth/callback/nodemailer').href;

    const outbox = await ownerPage.goto(`${baseUrl()}/team/outbox`);
    expect(outbox?.status()).toBe(404);
    expect(await ownerPage.content()).not.toContain('/api/auth/callback/nodemailer');
    await ownerPage.goto(`${baseUrl()}/team/members`, { waitUntil: 'networkidle' });
    expect(await ownerPage.getByRole('link', { name: 'Outbox' }).count()).toBe(0);
    expect(await ownerPage.content()).not.toContain(signInLink);
    await saveScreenshot(ownerPage, 'mail-privacy-owner-members');

    await signInPage.goto(signInLink, { waitUntil: 'networkidle' });
    const whoami = await (await stranger.request.get(`${baseUrl()}/api/me`)).json();
    expect(whoami.user.email).toBe(PERSON.email);
    await stranger.close();
  });
});
