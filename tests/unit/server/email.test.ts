import { readFileSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { getSession } from 'auth-astro/server';
import { simpleParser } from 'mailparser';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mailOutbox } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { keepMail, mailboxDir } from '../../../src/lib/server/local-mailbox';
import { sendMail } from '../../../src/lib/server/email';
import { identityForUser } from '../../../src/lib/server/identity';
import { createInvitation, INVITATION_LIFETIME_MS } from '../../../src/lib/server/invitations';
import { GET as authGet, POST as authPost } from '../../../src/pages/api/auth/[...auth]';
import { POST as acceptRoute } from '../../../src/pages/api/invitations/accept';
import { addTestMember, callRoute, cookieJar, ORIGIN } from '../../helpers/api-context';
import { makeTempDir } from '../../helpers/temp';
import { linkIn, startTestOutbox, waitForMail, type TestOutbox } from '../../helpers/mail';

let smtp: TestOutbox;

beforeAll(async () => {
  smtp = await startTestOutbox();
});

afterAll(async () => {
  await smtp?.close();
});

/** "name=value" pairs from a response's Set-Cookie headers. */
function cookiePairs(response: Response): string[] {
  return response.headers.getSetCookie().map((cookie) => cookie.split(';')[0]);
}

describe('local mailbox (no SMTP_HOST)', () => {
  it('keeps mail in this process: no relay is started and no relay setting is written into the environment', async () => {
    const to = `local-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    await sendMail({ to, subject: 'Kept locally', text: 'Nothing is delivered.' });
    expect(await waitForMail(to)).toMatchObject({ subject: 'Kept locally' });
    expect(process.env.SMTP_HOST).toBeUndefined();
    expect(process.env.SMTP_PORT).toBeUndefined();
  });

  it('stores each mail parsed (decoded subject, text and HTML)', async () => {
    const to = `parsed-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    await sendMail({
      to,
      subject: 'Rollendrehzahl ω = 12 rad/s — check',
      text: 'Plain part: https://slipless.example/a?b=1&c=2\nSecond line.',
      html: '<p>HTML part</p>',
    });
    const mail = await waitForMail(to);
    expect(mail.subject).toBe('Rollendrehzahl ω = 12 rad/s — check');
    expect(mail.text.trim()).toBe('Plain part: https://slipless.example/a?b=1&c=2\nSecond line.');
    expect(mail.html).toContain('<p>HTML part</p>');
  });

  it('prints each mail to the server log with its recipient, subject and links, and saves it as an .eml file only its owner may read', async () => {
    const to = `logged-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    await sendMail({ to, subject: 'Logged', text: 'Open https://slipless.example/x?y=1 or (https://slipless.example/z).' });
    await waitForMail(to);
    const entry = smtp.log.find((line) => line.startsWith(`Mail to ${to}: Logged`))!;
    expect(entry.split('\n').slice(1, 3)).toEqual(['  https://slipless.example/x?y=1', '  https://slipless.example/z']);
    const file = entry.match(/saved as (.+\.eml)$/)![1];
    expect(dirname(file)).toBe(smtp.mailboxDir);
    expect(basename(file)).toContain(to);
    expect(statSync(file).mode & 0o077).toBe(0);
    expect(statSync(smtp.mailboxDir).mode & 0o077).toBe(0);
    expect((await simpleParser(readFileSync(file))).subject).toBe('Logged');
  });

  it('saves into MAILBOX_DIR (else data/mail), creating the folder', async () => {
    expect(mailboxDir(undefined)).toBe(resolve('data/mail'));
    expect(mailboxDir(' ')).toBe(resolve('data/mail'));
    const dir = join(makeTempDir(), 'nested', 'mail');
    expect(mailboxDir(dir)).toBe(dir);
    const raw = 'To: someone@slipless.example\nSubject: Nested\n\nBody\n';
    await keepMail(await getDatabase(), { folder: dir, raw, recipients: 'someone@slipless.example', log: () => {} });
    expect(statSync(dir).isDirectory()).toBe(true);
    expect(statSync(dir).mode & 0o077).toBe(0);
  });
});

describe('mail round trips through the local mailbox', () => {
  it('delivers an invitation whose link accepts once', async () => {
    const database = await getDatabase();
    const owner = await addTestMember('owner');
    const ownerIdentity = (await identityForUser(database, owner.userId, Date.now()))!;
    const email = `mailed-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    const created = await createInvitation(database, { teamId: owner.teamId, inviter: ownerIdentity.user, email, role: 'reviewer', origin: ORIGIN });
    expect(created.ok).toBe(true);

    const mail = await waitForMail(email);
    const link = linkIn(mail.text, '/invite/');
    expect(link.origin).toBe(ORIGIN);
    const token = link.pathname.slice('/invite/'.length);

    const accept = (body: unknown) => callRoute(acceptRoute, { method: 'POST', path: '/api/invitations/accept', body });
    const accepted = await accept({ token, name: 'Mailed Reviewer', password: 'a mailed long password' });
    expect(accepted.status).toBe(200);
    expect(await accepted.json()).toMatchObject({ email, role: 'reviewer', createdAccount: true });

    const reused = await accept({ token, name: 'Mailed Reviewer', password: 'a mailed long password' });
    expect(reused.status).toBe(410);
    expect((await reused.json()).error.message).toBe('This invitation was already used.');
  });

  it('refuses a mailed invitation link after seven days with a message naming whom to ask', async () => {
    const database = await getDatabase();
    const owner = await addTestMember('owner');
    const ownerIdentity = (await identityForUser(database, owner.userId, Date.now()))!;
    const email = `expired-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    const eightDaysAgo = Date.now() - INVITATION_LIFETIME_MS - 24 * 60 * 60 * 1000;
    await createInvitation(database, { teamId: owner.teamId, inviter: ownerIdentity.user, email, role: 'viewer', origin: ORIGIN, now: eightDaysAgo });
    const token = linkIn((await waitForMail(email)).text, '/invite/').pathname.slice('/invite/'.length);

    const refused = await callRoute(acceptRoute, { method: 'POST', path: '/api/invitations/accept', body: { token, name: 'Too Late', password: 'a long enough password' } });
    expect(refused.status).toBe(410);
    expect((await refused.json()).error.message).toBe(`This invitation has expired; ask ${ownerIdentity.user.name} (the team owner) for a new one.`);
  });

  it('delivers an Auth.js sign-in link whose callback signs the user in once', async () => {
    const member = await addTestMember('viewer');
    const csrf = await authGet({ request: new Request(`${ORIGIN}/api/auth/csrf`), cookies: cookieJar(), clientAddress: '127.0.0.1' } as never);
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };

    const signInJar = cookieJar();
    const signIn = await authPost({
      request: new Request(`${ORIGIN}/api/auth/signin/nodemailer`, {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookiePairs(csrf).join('; '), 'x-auth-return-redirect': '1' },
        body: new URLSearchParams({ email: member.email, csrfToken, callbackUrl: `${ORIGIN}/` }),
      }),
      cookies: signInJar,
      clientAddress: '127.0.0.1',
    } as never);
    expect(signIn.status).toBe(200);
    const next = new URL((await signIn.json()).url);
    expect(next.pathname).toBe('/api/auth/verify-request');
    expect(next.searchParams.get('error')).toBeNull();

    const mail = await waitForMail(member.email);
    expect(mail.subject).toBe('Your Slipless sign-in link');
    const link = linkIn(mail.text, '/api/auth/callback/nodemailer');
    expect(link.searchParams.get('email')).toBe(member.email);

    const follow = async () => {
      const jar = cookieJar();
      const response = await authGet({ request: new Request(link), cookies: jar, clientAddress: '127.0.0.1' } as never);
      return { response, jar };
    };
    const first = await follow();
    expect(first.response.status).toBe(302);
    expect(first.response.headers.get('location')).toBe(`${ORIGIN}/`);
    const sessionCookie = [...first.jar.values].find(([name]) => name.endsWith('authjs.session-token'));
    expect(sessionCookie).toBeDefined();
    const session = await getSession(new Request(ORIGIN, { headers: { cookie: `${sessionCookie![0]}=${sessionCookie![1]}` } }));
    expect(session?.user).toMatchObject({ id: member.userId, email: member.email });

    const second = await follow();
    expect(second.response.headers.get('location')).toMatch(/\/sign-in\?error=Verification/);
  });

  it('keeps each caught mail once, in the outbox table', async () => {
    const database = await getDatabase();
    const to = `counted-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    await sendMail({ to, subject: 'one', text: 'one' });
    await sendMail({ to, subject: 'two', text: 'two' });
    const rows = await database.db.select({ subject: mailOutbox.subject }).from(mailOutbox).where(eq(mailOutbox.to, to));
    expect(rows.map((r) => r.subject).sort()).toEqual(['one', 'two']);
  });
});
