import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditEvents, invitations, memberships, users } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import {
  acceptInvitation,
  createInvitation,
  INVITATION_LIFETIME_MS,
  listPendingInvitations,
  previewInvitation,
  revokeInvitation,
} from '../../../src/lib/server/invitations';
import { verifyPassword } from '../../../src/lib/server/passwords';
import { hashSecretToken } from '../../../src/lib/server/tokens';
import { POST as acceptRoute } from '../../../src/pages/api/invitations/accept';
import { GET as listRoute, POST as createRoute } from '../../../src/pages/api/teams/[teamId]/invitations';
import { DELETE as revokeRoute } from '../../../src/pages/api/teams/[teamId]/invitations/[invitationId]';
import { addTestMember, callRoute, ORIGIN } from '../../helpers/api-context';
import { linkIn, mailsTo, startTestOutbox, waitForMail, type TestOutbox } from '../../helpers/mail';

let smtp: TestOutbox;

beforeAll(async () => {
  smtp = await startTestOutbox();
});

afterAll(async () => {
  await smtp?.close();
});

/** A fresh team with its owner (and the owner's identity), so the demo team stays as seeded. */
async function freshTeam() {
  const database = await getDatabase();
  const owner = await addTestMember('owner');
  const identity = (await identityForUser(database, owner.userId, Date.now()))!;
  return { database, teamId: owner.teamId, owner, identity };
}

function newAddress(label: string): string {
  return `${label}-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
}

/** Invites `email` and returns the token from the link in the mail that arrived. */
async function inviteAndReadToken(team: Awaited<ReturnType<typeof freshTeam>>, email: string, role: 'editor' | 'reviewer' | 'viewer' = 'reviewer', now?: number) {
  const created = await createInvitation(team.database, { teamId: team.teamId, inviter: team.identity.user, email, role, origin: ORIGIN, now });
  if (!created.ok) throw new Error(created.error.message);
  const mails = await mailsTo(email);
  const link = linkIn(mails[mails.length - 1].text, '/invite/');
  return { invitation: created.value, token: link.pathname.split('/').pop()!, link };
}

describe('invitations', () => {
  it('mails a single-use link to the invited address and stores only the token digest', async () => {
    const team = await freshTeam();
    const email = newAddress('invitee');
    const { invitation, token, link } = await inviteAndReadToken(team, email);

    expect(link.origin).toBe(ORIGIN);
    expect(token).toMatch(/^inv_[A-Za-z0-9_-]{43}$/);
    const mail = await waitForMail(email);
    expect(mail.subject).toContain('Join Test team');
    expect(mail.text).toContain('as reviewer');

    const [row] = await team.database.db.select().from(invitations).where(eq(invitations.id, invitation.id));
    expect(row.tokenHash).toBe(hashSecretToken(token));
    expect(JSON.stringify(row)).not.toContain(token);
    expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBeGreaterThan(INVITATION_LIFETIME_MS - 5_000);
    expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBeLessThan(INVITATION_LIFETIME_MS + 5_000);

    expect((await listPendingInvitations(team.database, team.teamId)).map((i) => i.email)).toEqual([email]);
    const [audit] = await team.database.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.teamId, team.teamId), eq(auditEvents.action, 'team.invite')));
    expect(audit).toMatchObject({ actorId: team.owner.userId, subject: email, detail: { invitationId: invitation.id, role: 'reviewer' } });
  });

  it('creates the account with name and argon2 password on accept, then refuses the same link again', async () => {
    const team = await freshTeam();
    const email = newAddress('newcomer');
    const { token } = await inviteAndReadToken(team, email, 'editor');

    const preview = await previewInvitation(team.database, token);
    expect(preview).toMatchObject({ ok: true, value: { email, role: 'editor', hasAccount: false, inviterName: team.identity.user.name } });
    expect(await acceptInvitation(team.database, { token })).toMatchObject({ ok: false, error: { kind: 'invalid', path: 'name' } });
    expect(await acceptInvitation(team.database, { token, name: 'Ada Newcomer' })).toMatchObject({ ok: false, error: { kind: 'invalid', path: 'password' } });

    const accepted = await acceptInvitation(team.database, { token, name: 'Ada Newcomer', password: 'a long new password' });
    expect(accepted).toMatchObject({ ok: true, value: { email, teamId: team.teamId, role: 'editor', createdAccount: true } });
    const [user] = await team.database.db.select().from(users).where(eq(users.email, email));
    expect(user.name).toBe('Ada Newcomer');
    expect(user.passwordHash).toMatch(/^\$argon2id\$/);
    expect(await verifyPassword(user.passwordHash!, 'a long new password')).toBe(true);
    expect(user.emailVerified).toBeInstanceOf(Date);
    const identity = await identityForUser(team.database, user.id, Date.now());
    expect(identity?.memberships).toEqual([expect.objectContaining({ teamId: team.teamId, role: 'editor' })]);

    expect(await acceptInvitation(team.database, { token, name: 'Someone Else', password: 'another long password' })).toEqual({
      ok: false,
      error: {
        kind: 'gone',
        message: 'This invitation was already used.',
      },
    });
    expect(await listPendingInvitations(team.database, team.teamId)).toEqual([]);
    const actions = await team.database.db
      .select({ action: auditEvents.action, actorId: auditEvents.actorId })
      .from(auditEvents)
      .where(and(eq(auditEvents.teamId, team.teamId), eq(auditEvents.action, 'team.invite_accepted')));
    expect(actions).toEqual([{ action: 'team.invite_accepted', actorId: user.id }]);
  });

  it('adds the membership to an existing account without asking for a name or password', async () => {
    const team = await freshTeam();
    const elsewhere = await addTestMember('viewer', { password: 'their own password' });
    const { token } = await inviteAndReadToken(team, elsewhere.email, 'reviewer');

    expect(await previewInvitation(team.database, token)).toMatchObject({ ok: true, value: { hasAccount: true } });
    const accepted = await acceptInvitation(team.database, { token });
    expect(accepted).toMatchObject({ ok: true, value: { createdAccount: false, role: 'reviewer' } });
    const roles = await team.database.db
      .select({ teamId: memberships.teamId, role: memberships.role })
      .from(memberships)
      .where(eq(memberships.userId, elsewhere.userId));
    expect(roles).toEqual(expect.arrayContaining([{ teamId: elsewhere.teamId, role: 'viewer' }, { teamId: team.teamId, role: 'reviewer' }]));
    const [user] = await team.database.db.select().from(users).where(eq(users.id, elsewhere.userId));
    expect(await verifyPassword(user.passwordHash!, 'their own password')).toBe(true);
  });

  it('refuses an expired link with a message that names whom to ask', async () => {
    const team = await freshTeam();
    const { token } = await inviteAndReadToken(team, newAddress('late'));
    const afterExpiry = Date.now() + INVITATION_LIFETIME_MS + 60_000;
    const refused = await acceptInvitation(team.database, { token, name: 'Late Person', password: 'a long new password', now: afterExpiry });
    expect(refused).toEqual({
      ok: false,
      error: {
        kind: 'gone',
        message: `This invitation has expired; ask ${team.identity.user.name} (the team owner) for a new one.`,
      },
    });
    expect(await listPendingInvitations(team.database, team.teamId, afterExpiry)).toEqual([]);
  });

  it('keeps only the newest link per address, and a revoked link stops working', async () => {
    const team = await freshTeam();
    const email = newAddress('twice');
    const first = await inviteAndReadToken(team, email);
    const second = await inviteAndReadToken(team, email, 'viewer');
    expect(await previewInvitation(team.database, first.token)).toMatchObject({ ok: false, error: { kind: 'gone', message: expect.stringMatching(/^This invitation was withdrawn; ask/) } });
    expect((await listPendingInvitations(team.database, team.teamId)).map((i) => i.id)).toEqual([second.invitation.id]);

    const revoked = await revokeInvitation(team.database, { teamId: team.teamId, invitationId: second.invitation.id, actorId: team.owner.userId });
    expect(revoked).toMatchObject({ ok: true, value: { email } });
    expect(await acceptInvitation(team.database, { token: second.token, name: 'X', password: 'a long new password' })).toMatchObject({ ok: false, error: { kind: 'gone' } });
    expect(await revokeInvitation(team.database, { teamId: team.teamId, invitationId: second.invitation.id, actorId: team.owner.userId })).toMatchObject({
      ok: false,
      error: { kind: 'not-found' },
    });
  });

  it('refuses to invite someone who is already a member, and unknown or malformed tokens', async () => {
    const team = await freshTeam();
    const member = await addTestMember('editor', { teamId: team.teamId });
    expect(
      await createInvitation(team.database, { teamId: team.teamId, inviter: team.identity.user, email: member.email.toUpperCase(), role: 'viewer', origin: ORIGIN }),
    ).toMatchObject({ ok: false, error: { kind: 'conflict', path: 'email' } });
    expect(await previewInvitation(team.database, 'inv_not-a-real-token')).toMatchObject({ ok: false, error: { kind: 'not-found' } });
    expect(await previewInvitation(team.database, 'slp_wrong-prefix')).toMatchObject({ ok: false, error: { kind: 'not-found' } });
  });
});

describe('invitation routes', () => {
  it('lets only the owner invite, list and revoke; others get 403, other teams 404', async () => {
    const team = await freshTeam();
    const editor = await addTestMember('editor', { teamId: team.teamId });
    const editorIdentity = (await identityForUser(team.database, editor.userId, Date.now()))!;
    const outsider = await freshTeam();
    const path = `/api/teams/${team.teamId}/invitations`;
    const params = { teamId: team.teamId };
    const email = newAddress('routed');

    const forbidden = await callRoute(createRoute, { method: 'POST', path, params, identity: editorIdentity, body: { email, role: 'viewer' } });
    expect(forbidden.status).toBe(403);
    expect((await callRoute(createRoute, { method: 'POST', path, params, identity: outsider.identity, body: { email, role: 'viewer' } })).status).toBe(404);
    expect((await callRoute(createRoute, { method: 'POST', path, params, body: { email, role: 'viewer' } })).status).toBe(401);
    const bad = await callRoute(createRoute, { method: 'POST', path, params, identity: team.identity, body: { email: 'not-an-address', role: 'viewer' } });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.path).toBe('email');
    const badRole = await callRoute(createRoute, { method: 'POST', path, params, identity: team.identity, body: { email, role: 'admin' } });
    expect((await badRole.json()).error).toMatchObject({ path: 'role' });

    const created = await callRoute(createRoute, { method: 'POST', path, params, identity: team.identity, body: { email: ` ${email.toUpperCase()} `, role: 'viewer' } });
    expect(created.status).toBe(201);
    const { invitation } = await created.json();
    expect(invitation).toMatchObject({ email, role: 'viewer' });
    expect(JSON.stringify(invitation)).not.toMatch(/inv_/);

    expect((await callRoute(listRoute, { path, params, identity: editorIdentity })).status).toBe(403);
    const listed = await (await callRoute(listRoute, { path, params, identity: team.identity })).json();
    expect(listed.invitations.map((i: { id: string }) => i.id)).toEqual([invitation.id]);

    const revokeParams = { teamId: team.teamId, invitationId: invitation.id };
    expect((await callRoute(revokeRoute, { method: 'DELETE', path: `${path}/${invitation.id}`, params: revokeParams, identity: editorIdentity })).status).toBe(403);
    expect((await callRoute(revokeRoute, { method: 'DELETE', path: `${path}/${invitation.id}`, params: revokeParams, identity: team.identity })).status).toBe(204);
    expect((await callRoute(revokeRoute, { method: 'DELETE', path: `${path}/${invitation.id}`, params: revokeParams, identity: team.identity })).status).toBe(404);
  });

  it('accepts through POST /api/invitations/accept, with field errors for a short password', async () => {
    const team = await freshTeam();
    const email = newAddress('accept-route');
    const { token } = await inviteAndReadToken(team, email, 'viewer');
    const short = await callRoute(acceptRoute, { method: 'POST', path: '/api/invitations/accept', body: { token, name: 'Route Person', password: 'short' } });
    expect(short.status).toBe(400);
    expect((await short.json()).error).toEqual({ message: 'Use at least 10 characters.', path: 'password' });

    const ok = await callRoute(acceptRoute, { method: 'POST', path: '/api/invitations/accept', body: { token, name: 'Route Person', password: 'a long new password' } });
    expect(ok.status).toBe(200);
    expect(await ok.json()).toEqual({ email, teamId: team.teamId, role: 'viewer', createdAccount: true });
    const again = await callRoute(acceptRoute, { method: 'POST', path: '/api/invitations/accept', body: { token, name: 'Route Person', password: 'a long new password' } });
    expect(again.status).toBe(410);
    expect((await again.json()).error.message).toBe('This invitation was already used.');
  });
});
