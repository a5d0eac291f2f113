import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { auditEvents, passwordResets, users } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { verifyPassword } from '../../../src/lib/server/passwords';
import {
  checkPasswordResetToken,
  confirmPasswordReset,
  PASSWORD_RESET_LIFETIME_MS,
  requestPasswordReset,
} from '../../../src/lib/server/password-reset';
import { hashSecretToken } from '../../../src/lib/server/tokens';
import { POST as requestRoute } from '../../../src/pages/api/account/password-reset';
import { POST as confirmRoute } from '../../../src/pages/api/account/password-reset/confirm';
import { addTestMember, callRoute, ORIGIN } from '../../helpers/api-context';
import { linkIn, mailsTo, startTestOutbox, waitForMail, type TestOutbox } from '../../helpers/mail';

let smtp: TestOutbox;

beforeAll(async () => {
  smtp = await startTestOutbox();
});

afterAll(async () => {
  await smtp?.close();
});

async function requestAndReadToken(email: string, now?: number): Promise<string> {
  await requestPasswordReset(await getDatabase(), { email, origin: ORIGIN, address: `test-${email}`, now });
  const mails = await mailsTo(email);
  return linkIn(mails[mails.length - 1].text, '/reset-password/').pathname.split('/').pop()!;
}

describe('password reset', () => {
  it('mails a one-hour link; confirming sets a new argon2 hash, audits it, and the link then stops working', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor', { password: 'the old password' });
    const token = await requestAndReadToken(member.email);
    expect(token).toMatch(/^pwr_[A-Za-z0-9_-]{43}$/);
    const [row] = await database.db.select().from(passwordResets).where(eq(passwordResets.userId, member.userId));
    expect(row.tokenHash).toBe(hashSecretToken(token));
    expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBeGreaterThan(PASSWORD_RESET_LIFETIME_MS - 5_000);
    expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBeLessThan(PASSWORD_RESET_LIFETIME_MS + 5_000);
    expect((await waitForMail(member.email)).subject).toBe('Reset your Slipless password');

    expect(await checkPasswordResetToken(database, token)).toEqual({ ok: true, value: { email: member.email } });
    expect(await confirmPasswordReset(database, { token, password: 'the brand new password' })).toMatchObject({ ok: true, value: { userId: member.userId } });
    const [user] = await database.db.select().from(users).where(eq(users.id, member.userId));
    expect(user.passwordHash).toMatch(/^\$argon2id\$/);
    expect(await verifyPassword(user.passwordHash!, 'the brand new password')).toBe(true);
    expect(await verifyPassword(user.passwordHash!, 'the old password')).toBe(false);
    const audit = await database.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.actorId, member.userId), eq(auditEvents.action, 'auth.password_reset')));
    expect(audit).toEqual([expect.objectContaining({ teamId: member.teamId })]);

    expect(await confirmPasswordReset(database, { token, password: 'yet another password' })).toMatchObject({
      ok: false,
      error: {
        kind: 'gone',
        message: expect.stringMatching(/^This reset link was already used/),
      },
    });
  });

  it('refuses an expired link', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    const token = await requestAndReadToken(member.email);
    const later = Date.now() + PASSWORD_RESET_LIFETIME_MS + 1_000;
    expect(await confirmPasswordReset(database, { token, password: 'too late password', now: later })).toEqual({
      ok: false,
      error: {
        kind: 'gone',
        message: 'This reset link has expired; ask for a new one.',
        path: 'token',
      },
    });
  });

  it('keeps only the newest link, and sends nothing for an address without an account', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    const first = await requestAndReadToken(member.email);
    const second = await requestAndReadToken(member.email);
    expect(first).not.toBe(second);
    expect(await checkPasswordResetToken(database, first)).toMatchObject({ ok: false, error: { kind: 'not-found' } });
    expect(await checkPasswordResetToken(database, second)).toMatchObject({ ok: true });

    const nobody = `nobody-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    await requestPasswordReset(database, { email: nobody, origin: ORIGIN });
    expect(await mailsTo(nobody)).toEqual([]);
  });

  it('stops mailing one address after three requests in the window', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    for (let i = 0; i < 5; i++) await requestPasswordReset(database, { email: member.email, origin: ORIGIN, address: `flood-${i}` });
    expect(await mailsTo(member.email)).toHaveLength(3);
  });

  it('keeps counting reset mails across a restart of the app', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    for (let i = 0; i < 3; i++) await requestPasswordReset(database, { email: member.email, origin: ORIGIN, address: `before-restart-${i}` });
    vi.resetModules();
    const restarted = await import('../../../src/lib/server/password-reset');
    await restarted.requestPasswordReset(database, { email: member.email, origin: ORIGIN, address: 'after-restart' });
    expect(await mailsTo(member.email)).toHaveLength(3);
  });
});

describe('password reset routes', () => {
  it('answers a known and an unknown address identically, and mails only the known one', async () => {
    const member = await addTestMember('viewer');
    const unknown = `unknown-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    const answers = [];
    for (const email of [member.email, unknown]) {
      const response = await callRoute(requestRoute, { method: 'POST', path: '/api/account/password-reset', body: { email } });
      answers.push({ status: response.status, body: await response.json() });
    }
    expect(answers[0]).toEqual(answers[1]);
    expect(answers[0].status).toBe(202);
    const mail = await waitForMail(member.email);
    expect(linkIn(mail.text, '/reset-password/').origin).toBe(ORIGIN);
    await new Promise((r) => setTimeout(r, 200));
    expect(await mailsTo(unknown)).toEqual([]);

    for (let i = 0; i < 4; i++) {
      const limited = await callRoute(requestRoute, { method: 'POST', path: '/api/account/password-reset', body: { email: member.email } });
      expect({ status: limited.status, body: await limited.json() }).toEqual(answers[0]);
    }

    const bad = await callRoute(requestRoute, { method: 'POST', path: '/api/account/password-reset', body: { email: 'nope' } });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.path).toBe('email');
  });

  it('confirms with field errors for a short password and 410 for a used link', async () => {
    const member = await addTestMember('viewer');
    const token = await requestAndReadToken(member.email);
    const short = await callRoute(confirmRoute, { method: 'POST', path: '/api/account/password-reset/confirm', body: { token, password: 'short' } });
    expect(short.status).toBe(400);
    expect((await short.json()).error).toEqual({ message: 'Use at least 10 characters.', path: 'password' });
    const ok = await callRoute(confirmRoute, { method: 'POST', path: '/api/account/password-reset/confirm', body: { token, password: 'a good long password' } });
    expect(ok.status).toBe(200);
    expect(await ok.json()).toEqual({ email: member.email });
    const used = await callRoute(confirmRoute, { method: 'POST', path: '/api/account/password-reset/confirm', body: { token, password: 'a good long password' } });
    expect(used.status).toBe(410);
  });
});
