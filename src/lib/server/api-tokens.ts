import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import type { Database } from '../../db';
import { apiTokens, teams, users } from '../../db/schema';
import type { ApiTokenSummary, CreatedApiToken, TeamApiToken } from '../contract';
import { fail, type Result } from '../result';
import type { Role } from '../roles';
import { roleWithin } from '../roles';
import { notFound, type Identity } from './access';
import { recordAudit } from './audit';
import { generateSecretToken } from './tokens';


const SESSION_ONLY = 'API tokens are managed from a signed-in browser session, not with another token.';

const summaryColumns = {
  id: apiTokens.id,
  name: apiTokens.name,
  teamId: apiTokens.teamId,
  teamName: teams.name,
  role: apiTokens.role,
  userId: apiTokens.userId,
  createdAt: apiTokens.createdAt,
  lastUsedAt: apiTokens.lastUsedAt,
  revokedAt: apiTokens.revokedAt,
};

/**
 * Creates a personal token for one team at a role no higher than the creator's own there.
 * The secret is returned once; only its SHA-256 digest is kept.
 */
export async function createApiToken(
  database: Database,
  identity: Identity,
  input: { teamId: string; name: string; role: Role },
  address: string | null = null,
): Promise<Result<CreatedApiToken>> {
  if (identity.via !== 'session') return fail({ kind: 'forbidden', message: SESSION_ONLY });
  const membership = identity.memberships.find((m) => m.teamId === input.teamId);
  if (!membership) return notFound();
  if (!roleWithin(input.role, membership.role)) {
    return fail({
      kind: 'forbidden',
      message: `A token cannot have more rights than you: your role in ${membership.name} is ${membership.role}, so choose ${membership.role} or lower.`,
      path: 'role',
    });
  }
  const { token, hash } = generateSecretToken();
  const [row] = await database.write((db) =>
    db
      .insert(apiTokens)
      .values({ teamId: input.teamId, userId: identity.user.id, name: input.name, role: input.role, tokenHash: hash })
      .returning(),
  );
  await recordAudit(database, {
    teamId: input.teamId,
    actorId: identity.user.id,
    action: 'token.create',
    subject: `token:${row.id}`,
    detail: { name: input.name, role: input.role },
    address,
  });
  return {
    ok: true,
    value: {
      token,
      summary: {
        id: row.id,
        name: row.name,
        teamId: row.teamId,
        teamName: membership.name,
        role: row.role,
        userId: row.userId,
        createdAt: row.createdAt,
        lastUsedAt: row.lastUsedAt,
        revokedAt: row.revokedAt,
      },
    },
  };
}

/** The user's own tokens, newest first, revoked ones included (with when). */
export async function listApiTokens(database: Database, userId: string): Promise<ApiTokenSummary[]> {
  return database.db
    .select(summaryColumns)
    .from(apiTokens)
    .innerJoin(teams, eq(teams.id, apiTokens.teamId))
    .where(eq(apiTokens.userId, userId))
    .orderBy(desc(apiTokens.createdAt));
}

/** A team's tokens with their holders, for the owner's overview; active ones first, then newest first. */
export async function listTeamApiTokens(database: Database, teamId: string): Promise<TeamApiToken[]> {
  return database.db
    .select({ ...summaryColumns, holderEmail: users.email, holderName: users.name })
    .from(apiTokens)
    .innerJoin(teams, eq(teams.id, apiTokens.teamId))
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.teamId, teamId))
    .orderBy(sql`${apiTokens.revokedAt} is not null`, desc(apiTokens.createdAt));
}

/**
 * Revokes a token: the holder may revoke their own, a team owner any token of that team.
 * Anyone else gets not-found so other people's token ids reveal nothing. Revoking twice is harmless.
 */
export async function revokeApiToken(
  database: Database,
  identity: Identity,
  tokenId: string,
  address: string | null = null,
): Promise<Result<ApiTokenSummary>> {
  if (identity.via !== 'session') return fail({ kind: 'forbidden', message: SESSION_ONLY });
  const [found] = await database.db
    .select({ ...summaryColumns, holderEmail: users.email })
    .from(apiTokens)
    .innerJoin(teams, eq(teams.id, apiTokens.teamId))
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.id, tokenId));
  const ownsTeam = identity.memberships.some((m) => m.teamId === found?.teamId && m.role === 'owner');
  if (!found || (found.userId !== identity.user.id && !ownsTeam)) return notFound();
  const { holderEmail, ...token } = found;
  if (token.revokedAt) return { ok: true, value: token };

  const revokedAt = new Date();
  await database.write((db) => db.update(apiTokens).set({ revokedAt }).where(and(eq(apiTokens.id, tokenId), isNull(apiTokens.revokedAt))));
  await recordAudit(database, {
    teamId: token.teamId,
    actorId: identity.user.id,
    action: 'token.revoke',
    subject: `token:${token.id}`,
    detail: { name: token.name, holder: holderEmail },
    address,
  });
  return { ok: true, value: { ...token, revokedAt } };
}
