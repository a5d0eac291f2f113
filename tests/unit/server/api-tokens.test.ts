import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { apiTokens, auditEvents } from '../../../src/db/schema';
import type { Identity } from '../../../src/lib/server/access';
import { createApiToken, listApiTokens, listTeamApiTokens, revokeApiToken } from '../../../src/lib/server/api-tokens';
import { getDatabase } from '../../../src/lib/server/database';
import { statusOf } from '../../../src/lib/server/http';
import { identityForToken, identityForUser } from '../../../src/lib/server/identity';
import { removeMember } from '../../../src/lib/server/members';
import { hashSecretToken } from '../../../src/lib/server/tokens';
import { GET as listRoute, POST as createRoute } from '../../../src/pages/api/tokens';
import { GET as meRoute } from '../../../src/pages/api/me';
import { addTestMember, callRoute, callThroughMiddleware, demoIdentity, demoTeamId } from '../../helpers/api-context';

let teamId: string;
let editor: Identity;
let owner: Identity;

beforeAll(async () => {
  teamId = await demoTeamId();
  editor = await demoIdentity('editor');
  owner = await demoIdentity('owner');
});

async function mint(identity: Identity, role: 'owner' | 'editor' | 'reviewer' | 'viewer', name = 'test token') {
  const created = await createApiToken(await getDatabase(), identity, { teamId, name, role });
  if (!created.ok) throw new Error(created.error.message);
  return created.value;
}

describe('createApiToken', () => {
  it('caps the role at the creator\'s own: every permission of the token role must be one the creator has', async () => {
    const database = await getDatabase();
    const outcomes = await Promise.all(
      (['owner', 'editor', 'reviewer', 'viewer'] as const).map(async (role) => [role, await createApiToken(database, editor, { teamId, name: `cap ${role}`, role })] as const),
    );
    const statuses = Object.fromEntries(outcomes.map(([role, o]) => [role, o.ok ? 'created' : statusOf(o.error)]));
    // An editor lacks review and log upload, so a reviewer token would exceed the editor's rights.
    expect(statuses).toEqual({ owner: 403, editor: 'created', reviewer: 403, viewer: 'created' });
    const refused = outcomes[0][1];
    expect(!refused.ok && refused.error.message).toMatch(/your role in .* is editor, so choose editor or lower/);
    for (const role of ['owner', 'editor', 'reviewer', 'viewer'] as const) {
      expect((await createApiToken(database, owner, { teamId, name: `owner ${role}`, role })).ok).toBe(true);
    }
  });

  it('answers 404 for a team the creator is not in, and 403 when the caller is itself a token', async () => {
    const database = await getDatabase();
    const outsider = await addTestMember('owner');
    const notMine = await createApiToken(database, editor, { teamId: outsider.teamId, name: 'x', role: 'viewer' });
    expect(notMine).toMatchObject({ ok: false, error: { kind: 'not-found' } });

    const { token } = await mint(editor, 'editor');
    const viaToken = (await identityForToken(database, token))!;
    expect(await createApiToken(database, viaToken, { teamId, name: 'minted by a token', role: 'viewer' })).toMatchObject({
      ok: false,
      error: {
        kind: 'forbidden',
        message: expect.stringMatching(/browser session/),
      },
    });
    const response = await callThroughMiddleware(createRoute, {
      method: 'POST',
      path: '/api/tokens',
      headers: { authorization: `Bearer ${token}` },
      body: { teamId, name: 'minted by a token', role: 'viewer' },
    });
    expect(response.status).toBe(403);
  });

  it('shows the secret once and keeps only its SHA-256 digest', async () => {
    const database = await getDatabase();
    const response = await callRoute(createRoute, { method: 'POST', path: '/api/tokens', identity: editor, body: { teamId, name: 'shown once', role: 'viewer' } });
    expect(response.status).toBe(201);
    expect(response.headers.get('cache-control')).toBe('no-store');
    const { token, summary } = await response.json();
    expect(token).toMatch(/^slp_[\w-]{43}$/);

    const [row] = await database.db.select().from(apiTokens).where(eq(apiTokens.id, summary.id));
    expect(row.tokenHash).toBe(hashSecretToken(token));
    expect(JSON.stringify(row)).not.toContain(token);

    const listed = await (await callRoute(listRoute, { path: '/api/tokens', identity: editor })).text();
    expect(listed).toContain(summary.id);
    expect(listed).not.toContain(token);
    expect(listed).not.toContain(row.tokenHash);
    const mine = await listApiTokens(database, editor.user.id);
    expect(Object.keys(mine[0]).sort()).toEqual(['createdAt', 'id', 'lastUsedAt', 'name', 'revokedAt', 'role', 'teamId', 'teamName', 'userId']);
  });

  it('records token.create and token.revoke in the team audit trail', async () => {
    const database = await getDatabase();
    const { summary } = await mint(editor, 'viewer', 'audited');
    await revokeApiToken(database, editor, summary.id, '10.0.0.7');
    const events = await database.db.select().from(auditEvents).where(eq(auditEvents.subject, `token:${summary.id}`));
    expect(events.map((e) => e.action).sort()).toEqual(['token.create', 'token.revoke']);
    expect(events.every((e) => e.teamId === teamId && e.actorId === editor.user.id)).toBe(true);
    expect(events.find((e) => e.action === 'token.revoke')).toMatchObject({ address: '10.0.0.7', detail: { name: 'audited', holder: 'editor@tarnwhistle.example' } });
  });
});

describe('using and revoking a token', () => {
  it('works as a bearer through the middleware, records last use, and after revocation answers 401', async () => {
    const database = await getDatabase();
    const { token, summary } = await mint(editor, 'viewer', 'bearer');
    const bearer = { path: '/api/me', headers: { authorization: `Bearer ${token}` } };

    const before = await callThroughMiddleware(meRoute, bearer);
    expect(before.status).toBe(200);
    expect(await before.json()).toMatchObject({ via: 'token', teams: [{ teamId, role: 'viewer' }] });
    const [used] = await listApiTokens(database, editor.user.id).then((all) => all.filter((t) => t.id === summary.id));
    expect(used.lastUsedAt).toBeInstanceOf(Date);

    expect(await revokeApiToken(database, editor, summary.id)).toMatchObject({ ok: true, value: { revokedAt: expect.any(Date) } });
    expect(await identityForToken(database, token)).toBeNull();
    let reachedRoute = false;
    const after = await callThroughMiddleware(
      async (context) => {
        reachedRoute = true;
        return meRoute(context);
      },
      bearer,
    );
    expect(after.status).toBe(401);
    expect((await after.json()).error.message).toMatch(/revoked/);
    expect(reachedRoute).toBe(false);
  });

  it('lets the holder and the team owner revoke, and hides the token from everyone else (404)', async () => {
    const database = await getDatabase();
    const reviewer = await demoIdentity('reviewer');
    const { summary: first } = await mint(editor, 'viewer', 'revoke by owner');
    expect(await revokeApiToken(database, reviewer, first.id)).toMatchObject({ ok: false, error: { kind: 'not-found' } });
    expect(await revokeApiToken(database, owner, first.id)).toMatchObject({ ok: true });
    const { summary: second } = await mint(editor, 'viewer', 'revoke by holder');
    expect(await revokeApiToken(database, editor, second.id)).toMatchObject({ ok: true });
    expect(await revokeApiToken(database, editor, 'no-such-token')).toMatchObject({ ok: false, error: { kind: 'not-found' } });
  });

  it("lists every member's tokens of a team for the owner, active ones first, without secrets", async () => {
    const database = await getDatabase();
    const { token, summary } = await mint(editor, 'viewer', 'seen by the owner');
    const { summary: gone } = await mint(editor, 'viewer', 'revoked before listing');
    await revokeApiToken(database, editor, gone.id);
    const listed = await listTeamApiTokens(database, teamId);
    const revokedAt = listed.map((t) => t.revokedAt);
    expect(revokedAt.findIndex((r) => r !== null)).toBeGreaterThan(revokedAt.lastIndexOf(null));
    expect(listed.find((t) => t.id === summary.id)).toMatchObject({ holderEmail: 'editor@tarnwhistle.example', role: 'viewer' });
    expect(JSON.stringify(listed)).not.toContain(token);
  });

  it('stops working when the holder is removed from the team, and stays revoked if they return', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor', { teamId });
    const identity = (await identityForUser(database, member.userId, Date.now()))!;
    const { token } = await mint(identity, 'editor', 'leaver');
    expect(await identityForToken(database, token)).not.toBeNull();
    expect(await removeMember(database, owner, teamId, member.userId)).toMatchObject({ ok: true });
    expect(await identityForToken(database, token)).toBeNull();
    const [row] = await database.db.select().from(apiTokens).where(eq(apiTokens.tokenHash, hashSecretToken(token)));
    expect(row.revokedAt).toBeInstanceOf(Date);
  });
});
