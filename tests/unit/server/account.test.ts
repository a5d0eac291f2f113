import { describe, expect, it, vi } from 'vitest';
import { changePassword } from '../../../src/lib/server/account';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { addTestMember } from '../../helpers/api-context';

describe('changePassword', () => {
  it('refuses the current password after five wrong ones, even after a restart of the app, and says how long to wait', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor', { password: 'the right password' });
    const identity = (await identityForUser(database, member.userId, 0))!;
    const input = { currentPassword: 'a wrong password', newPassword: 'the second password' };
    for (let i = 0; i < 5; i++) expect(await changePassword(database, identity, input, null)).toMatchObject({ ok: false, error: { kind: 'invalid' } });

    vi.resetModules();
    const restarted = await import('../../../src/lib/server/account');
    const refused = await restarted.changePassword(database, identity, { ...input, currentPassword: 'the right password' }, null);
    expect(refused).toEqual({ ok: false, error: { kind: 'rate-limited', message: 'Too many wrong passwords. Try again in 15 minutes.' } });
  });
});
