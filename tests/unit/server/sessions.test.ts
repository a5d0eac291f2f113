import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { users } from '../../../src/db/schema';
import { changePassword } from '../../../src/lib/server/account';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { confirmPasswordReset, requestPasswordReset } from '../../../src/lib/server/password-reset';
import { addTestMember, ORIGIN } from '../../helpers/api-context';
import { linkIn, mailsTo, startTestOutbox, type TestOutbox } from '../../helpers/mail';

// Ending every session when the password changes or is reset is common practice.

let smtp: TestOutbox;

beforeAll(async () => {
  smtp = await startTestOutbox();
});

afterAll(async () => {
  await smtp?.close();
});

describe('sessions and password changes', () => {
  it('accepts a session of any age while the password has never changed', async () => {
    const member = await addTestMember('viewer');
    expect(await identityForUser(await getDatabase(), member.userId, 0)).toMatchObject({ user: { id: member.userId }, via: 'session' });
  });

  it('refuses sessions begun before a password change and accepts those begun after it', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor', { password: 'the first password' });
    const before = Date.now() - 1_000;
    const identity = (await identityForUser(database, member.userId, before))!;
    expect(await changePassword(database, identity, { currentPassword: 'the first password', newPassword: 'the second password' }, null)).toEqual({ ok: true });
    const [row] = await database.db.select({ from: users.sessionsValidFrom }).from(users).where(eq(users.id, member.userId));
    expect(row.from!.getTime()).toBeGreaterThan(before);
    expect(await identityForUser(database, member.userId, before)).toBeNull();
    expect(await identityForUser(database, member.userId, row.from!.getTime() - 1)).toBeNull();
    expect(await identityForUser(database, member.userId, row.from!.getTime())).not.toBeNull();
  });

  it('leaves sessions alone when the current password is wrong', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor', { password: 'the right password' });
    const identity = (await identityForUser(database, member.userId, 0))!;
    const outcome = await changePassword(database, identity, { currentPassword: 'a wrong password', newPassword: 'the second password' }, null);
    expect(outcome).toMatchObject({ ok: false, error: { kind: 'invalid' } });
    expect(await identityForUser(database, member.userId, 0)).not.toBeNull();
  });

  it('refuses sessions begun before a password reset', async () => {
    const database = await getDatabase();
    const member = await addTestMember('reviewer');
    const before = Date.now() - 1_000;
    await requestPasswordReset(database, { email: member.email, origin: ORIGIN, address: `sessions-${member.email}` });
    const mails = await mailsTo(member.email);
    const token = linkIn(mails[mails.length - 1].text, '/reset-password/').pathname.split('/').pop()!;
    const resetAt = Date.now();
    expect(await confirmPasswordReset(database, { token, password: 'a password after reset', now: resetAt })).toMatchObject({ ok: true });
    expect(await identityForUser(database, member.userId, before)).toBeNull();
    expect(await identityForUser(database, member.userId, resetAt)).not.toBeNull();
  });
});
