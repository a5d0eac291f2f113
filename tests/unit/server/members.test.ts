import { and, eq, sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { auditEvents } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { changeRole, listMembers, removeMember } from '../../../src/lib/server/members';
import { PATCH as patchMember } from '../../../src/pages/api/teams/[teamId]/members/[userId]';
import { addTestMember, callRoute } from '../../helpers/api-context';

/** A fresh team with one owner and one editor, so the demo team stays as seeded. */
async function freshTeam() {
  const database = await getDatabase();
  const owner = await addTestMember('owner');
  const editor = await addTestMember('editor', { teamId: owner.teamId });
  return { database, teamId: owner.teamId, owner, editor, ownerIdentity: (await identityForUser(database, owner.userId, Date.now()))! };
}

describe('members', () => {
  it('lists members owners first, with e-mail, role and join time', async () => {
    const { database, teamId, owner, editor } = await freshTeam();
    const members = await listMembers(database, teamId);
    expect(members.map((m) => [m.userId, m.role])).toEqual([
      [owner.userId, 'owner'],
      [editor.userId, 'editor'],
    ]);
    expect(members[0]).toMatchObject({ email: owner.email, joinedAt: expect.any(Date) });
  });

  it('refuses to demote or remove the last owner with 409 and a message that says what to do', async () => {
    const { database, teamId, owner, ownerIdentity } = await freshTeam();
    const demoted = await changeRole(database, ownerIdentity, teamId, owner.userId, 'editor');
    expect(demoted).toMatchObject({ ok: false, error: { kind: 'conflict', message: expect.stringMatching(/at least one owner.*make someone else owner first/) } });
    expect(await removeMember(database, ownerIdentity, teamId, owner.userId)).toMatchObject({ ok: false, error: { kind: 'conflict' } });
    expect((await listMembers(database, teamId)).find((m) => m.userId === owner.userId)?.role).toBe('owner');

    const response = await callRoute(patchMember, {
      method: 'PATCH',
      path: `/api/teams/${teamId}/members/${owner.userId}`,
      params: { teamId, userId: owner.userId },
      identity: ownerIdentity,
      body: { role: 'viewer' },
    });
    expect(response.status).toBe(409);
    expect(await response.json()).toMatchObject({ error: { message: expect.stringMatching(/at least one owner/), path: 'role' } });
  });

  it('lets an owner step down once another owner exists, and records both changes', async () => {
    const { database, teamId, owner, editor, ownerIdentity } = await freshTeam();
    expect(await changeRole(database, ownerIdentity, teamId, editor.userId, 'owner', '10.1.2.3')).toMatchObject({ ok: true, value: { role: 'owner' } });
    expect(await changeRole(database, ownerIdentity, teamId, owner.userId, 'viewer')).toMatchObject({ ok: true, value: { role: 'viewer' } });
    const newOwner = (await identityForUser(database, editor.userId, Date.now()))!;
    expect(await removeMember(database, newOwner, teamId, owner.userId)).toMatchObject({ ok: true });
    expect((await listMembers(database, teamId)).map((m) => m.role)).toEqual(['owner']);

    const events = await database.db.select().from(auditEvents).where(eq(auditEvents.teamId, teamId)).orderBy(sql`rowid`);
    expect(events.map((e) => [e.action, e.detail])).toEqual([
      ['team.role_change', { email: editor.email, from: 'editor', to: 'owner' }],
      ['team.role_change', { email: owner.email, from: 'owner', to: 'viewer' }],
      ['team.member_remove', { email: owner.email, role: 'viewer' }],
    ]);
    expect(events[0]).toMatchObject({ actorId: owner.userId, subject: `user:${editor.userId}`, address: '10.1.2.3' });
  });

  it('answers 404 for someone who is not in the team and records nothing for a no-op change', async () => {
    const { database, teamId, editor, ownerIdentity } = await freshTeam();
    const stranger = await addTestMember('owner');
    expect(await changeRole(database, ownerIdentity, teamId, stranger.userId, 'viewer')).toMatchObject({ ok: false, error: { kind: 'not-found' } });
    expect(await removeMember(database, ownerIdentity, teamId, stranger.userId)).toMatchObject({ ok: false, error: { kind: 'not-found' } });
    expect(await changeRole(database, ownerIdentity, teamId, editor.userId, 'editor')).toMatchObject({ ok: true });
    const events = await database.db.select().from(auditEvents).where(and(eq(auditEvents.teamId, teamId), eq(auditEvents.action, 'team.role_change')));
    expect(events).toHaveLength(0);
  });
});
