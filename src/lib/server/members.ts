import { and, asc, count, eq, isNull, sql } from 'drizzle-orm';
import type { Database, Transaction } from '../../db';
import { apiTokens, memberships, users } from '../../db/schema';
import type { Member } from '../contract';
import { fail, type Result } from '../result';
import type { Role } from '../roles';
import type { Identity } from './access';
import { recordAudit } from './audit';


const memberColumns = {
  userId: users.id,
  name: users.name,
  email: users.email,
  role: memberships.role,
  joinedAt: memberships.createdAt,
};

const ROLE_ORDER = sql`case ${memberships.role} when 'owner' then 0 when 'editor' then 1 when 'reviewer' then 2 else 3 end`;

const LAST_OWNER =
  'A team needs at least one owner: make someone else owner first, then change or remove this one.';

/** The team's members, owners first, then by name. */
export async function listMembers(database: Database, teamId: string): Promise<Member[]> {
  return database.db
    .select(memberColumns)
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId))
    .orderBy(ROLE_ORDER, asc(users.name), asc(users.email));
}

/**
 * Sets a member's role (the route has checked that the actor may manage the team). Demoting
 * the last owner is refused so a team never ends up without anyone who can manage it. Tokens
 * above the new role stop working by themselves (identityForToken caps them).
 */
export async function changeRole(
  database: Database,
  actor: Identity,
  teamId: string,
  userId: string,
  role: Role,
  address: string | null = null,
): Promise<Result<Member>> {
  const outcome = await database.transaction(async (tx): Promise<Result<{ member: Member; from: Role }>> => {
    const member = await findMember(tx, teamId, userId);
    if (!member) return fail({ kind: 'not-found', message: 'That person is not a member of this team.' });
    if (member.role === 'owner' && role !== 'owner' && (await countOwners(tx, teamId)) <= 1) {
      return fail({ kind: 'conflict', message: LAST_OWNER, path: 'role' });
    }
    if (member.role !== role) {
      await tx.update(memberships).set({ role }).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    }
    return { ok: true, value: { member: { ...member, role }, from: member.role } };
  });
  if (!outcome.ok) return outcome;
  const { member, from } = outcome.value;
  if (from !== role) {
    await recordAudit(database, {
      teamId,
      actorId: actor.user.id,
      action: 'team.role_change',
      subject: `user:${userId}`,
      detail: { email: member.email, from, to: role },
      address,
    });
  }
  return { ok: true, value: member };
}

/**
 * Removes a member and revokes their tokens for this team (so re-adding them later does not
 * revive old tokens). The last owner cannot be removed.
 */
export async function removeMember(
  database: Database,
  actor: Identity,
  teamId: string,
  userId: string,
  address: string | null = null,
): Promise<Result<Member>> {
  const outcome = await database.transaction(async (tx): Promise<Result<Member>> => {
    const member = await findMember(tx, teamId, userId);
    if (!member) return fail({ kind: 'not-found', message: 'That person is not a member of this team.' });
    if (member.role === 'owner' && (await countOwners(tx, teamId)) <= 1) return fail({ kind: 'conflict', message: LAST_OWNER });
    await tx.delete(memberships).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    await tx
      .update(apiTokens)
      .set({ revokedAt: new Date() })
      .where(and(eq(apiTokens.teamId, teamId), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)));
    return { ok: true, value: member };
  });
  if (!outcome.ok) return outcome;
  await recordAudit(database, {
    teamId,
    actorId: actor.user.id,
    action: 'team.member_remove',
    subject: `user:${userId}`,
    detail: { email: outcome.value.email, role: outcome.value.role },
    address,
  });
  return outcome;
}

async function findMember(tx: Transaction, teamId: string, userId: string): Promise<Member | undefined> {
  const [member] = await tx
    .select(memberColumns)
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
  return member;
}

async function countOwners(tx: Transaction, teamId: string): Promise<number> {
  const [{ n }] = await tx
    .select({ n: count() })
    .from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'owner')));
  return n;
}
