import { and, eq, isNull, lt, sql } from 'drizzle-orm';
import type { Database, DrizzleDb } from '../../db';
import { apiTokens, endedSessions, memberships, teams, users } from '../../db/schema';
import { roleWithin } from '../roles';
import type { Identity, TeamMembership } from './access';
import { preparedPerConnection } from './prepared';
import { API_TOKEN_PREFIX, hashSecretToken } from './tokens';

const TOKEN_TOUCH_INTERVAL_MS = 60_000;

/** The teams and roles of one user. */
export async function getMemberships(database: Database, userId: string): Promise<TeamMembership[]> {
  return database.db
    .select({ teamId: teams.id, slug: teams.slug, name: teams.name, role: memberships.role })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, userId))
    .orderBy(teams.name);
}

/**
 * The user, whether the session was ended, and one row per membership (team columns null when the
 * user has none), in one statement: it runs on every signed-in request, so it is built once per
 * connection and its SQL reused.
 */
const identityQuery = preparedPerConnection((db: DrizzleDb) =>
  db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      sessionsValidFrom: users.sessionsValidFrom,
      ended: sql<number>`exists (select 1 from ${endedSessions} where ${endedSessions.sessionId} = ${sql.placeholder('sessionId')})`,
      teamId: teams.id,
      slug: teams.slug,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(users)
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(users.id, sql.placeholder('userId')))
    .orderBy(teams.name, teams.slug)
    .prepare(),
);

/**
 * The identity of a user signed in at signedInAt (ms since the epoch) in session `sessionId`, or
 * null when the user no longer exists, the session was signed out, or it began before the
 * password last changed or was reset.
 */
export async function identityForUser(database: Database, userId: string, signedInAt: number, sessionId?: string): Promise<Identity | null> {
  // Without a session id nothing can have ended it: `= NULL` matches no row.
  const rows = await identityQuery(database.db).all({ userId, sessionId: sessionId ?? null });
  const user = rows[0];
  if (!user?.email || user.ended) return null;
  if (user.sessionsValidFrom && signedInAt < user.sessionsValidFrom.getTime()) return null;
  const memberships = rows.flatMap(({ teamId, slug, teamName, role }) => (teamId !== null && slug !== null && teamName !== null && role !== null ? [{ teamId, slug, name: teamName, role }] : []));
  return { user: { id: user.id, email: user.email, name: user.name }, via: 'session', memberships };
}

/**
 * Ends a session on the server, so a copy of its cookie stops working although the cookie itself
 * stays valid until it expires. Records of sessions past their expiry are dropped on the way:
 * their cookies are refused anyway.
 */
export async function endSession(database: Database, session: { sessionId: string; userId: string | null; expiresAt: Date }): Promise<void> {
  await database.transaction(async (tx) => {
    await tx.delete(endedSessions).where(lt(endedSessions.expiresAt, new Date()));
    await tx.insert(endedSessions).values(session).onConflictDoNothing();
  });
}

/**
 * The identity behind a bearer API token: its one team at the token's role, capped by the
 * owner's current role there; null for unknown or revoked tokens or a lapsed membership.
 */
export async function identityForToken(database: Database, token: string): Promise<Identity | null> {
  if (!token.startsWith(API_TOKEN_PREFIX)) return null;
  const [row] = await database.db
    .select({ token: apiTokens, user: { id: users.id, email: users.email, name: users.name } })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.tokenHash, hashSecretToken(token)), isNull(apiTokens.revokedAt)));
  if (!row?.user.email) return null;
  const membership = (await getMemberships(database, row.user.id)).find((m) => m.teamId === row.token.teamId);
  if (!membership || !roleWithin(row.token.role, membership.role)) return null;
  const now = Date.now();
  if (!row.token.lastUsedAt || now - row.token.lastUsedAt.getTime() > TOKEN_TOUCH_INTERVAL_MS) {
    await database.write((db) => db.update(apiTokens).set({ lastUsedAt: new Date(now) }).where(eq(apiTokens.id, row.token.id)));
  }
  return {
    user: { id: row.user.id, email: row.user.email, name: row.user.name },
    via: 'token',
    tokenId: row.token.id,
    memberships: [{ ...membership, role: row.token.role }],
  };
}

/** Reads "Authorization: Bearer <token>", if present. */
export function bearerToken(request: Request): string | null {
  const header = request.headers.get('authorization');
  const match = header?.match(/^Bearer\s+(\S+)$/i);
  return match ? match[1] : null;
}
