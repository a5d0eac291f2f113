import { and, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { memberships, teams } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { endSession, getMemberships, identityForUser } from '../../../src/lib/server/identity';
import { addTestMember } from '../../helpers/api-context';

// A session's identity reflects the database at the moment of each request (no stale roles or teams): common practice.

describe('the identity behind a session', () => {
  it('lists every team of the user with its role, ordered by team name, the same as getMemberships', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    const [other] = await database.write((db) => db.insert(teams).values({ slug: `aardvark-${member.userId.slice(0, 8)}`, name: 'Aardvark works' }).returning({ id: teams.id }));
    await database.write((db) => db.insert(memberships).values({ teamId: other.id, userId: member.userId, role: 'reviewer' }));
    const identity = await identityForUser(database, member.userId, Date.now(), 'a-live-session');
    expect(identity?.memberships.map((m) => [m.name, m.role])).toEqual([
      ['Aardvark works', 'reviewer'],
      [expect.stringMatching(/^Test team /), 'viewer'],
    ]);
    expect(identity?.memberships).toEqual(await getMemberships(database, member.userId));
  });

  it('answers a user without teams with no memberships, and sees a role change or a removal on the next call', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor');
    await database.write((db) => db.update(memberships).set({ role: 'viewer' }).where(eq(memberships.userId, member.userId)));
    expect((await identityForUser(database, member.userId, Date.now()))?.memberships).toMatchObject([{ teamId: member.teamId, role: 'viewer' }]);
    await database.write((db) => db.delete(memberships).where(and(eq(memberships.userId, member.userId), eq(memberships.teamId, member.teamId))));
    expect((await identityForUser(database, member.userId, Date.now()))?.memberships).toEqual([]);
  });

  it('refuses an ended session of a user with several teams (one refusal, not one per team row)', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor');
    const [other] = await database.write((db) => db.insert(teams).values({ slug: `second-${member.userId.slice(0, 8)}`, name: 'Second team' }).returning({ id: teams.id }));
    await database.write((db) => db.insert(memberships).values({ teamId: other.id, userId: member.userId, role: 'viewer' }));
    await endSession(database, { sessionId: `ended-${member.userId}`, userId: member.userId, expiresAt: new Date(Date.now() + 60_000) });
    expect(await identityForUser(database, member.userId, Date.now(), `ended-${member.userId}`)).toBeNull();
    expect(await identityForUser(database, member.userId, Date.now(), `live-${member.userId}`)).not.toBeNull();
    expect(await identityForUser(database, 'no-such-user', Date.now())).toBeNull();
  });
});
