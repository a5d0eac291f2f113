import { and, desc, eq, gt, isNull } from 'drizzle-orm';
import type { Database } from '../../db';
import { invitations, memberships, teams, users } from '../../db/schema';
import type { PendingInvitation } from '../contract';
import { fail, type Result } from '../result';
import type { Role } from '../roles';
import type { Identity } from './access';
import { recordAudit } from './audit';
import { sendMail } from './email';
import { hashPassword } from './passwords';
import { generateSecretToken, hashSecretToken } from './tokens';
import { createUsers, findUserByEmail, normaliseEmail } from './users';

export const INVITATION_TOKEN_PREFIX = 'inv_';
export const INVITATION_LIFETIME_MS = 7 * 24 * 60 * 60 * 1000;


/** What the accept page shows about an invitation link. */
export interface InvitationPreview {
  email: string;
  role: Role;
  teamName: string;
  inviterName: string | null;
  expiresAt: Date;
  /** True when someone already has an account with that e-mail (no name or password is asked then). */
  hasAccount: boolean;
}

function whomToAsk(inviterName: string | null, teamName: string): string {
  return inviterName ? `${inviterName} (the team owner)` : `an owner of ${teamName}`;
}

/** Why an invitation can no longer be used, in words for the person holding the link; null when it can. */
function refusal(row: { expiresAt: Date; acceptedAt: Date | null; revokedAt: Date | null }, inviterName: string | null, teamName: string, now: number): string | null {
  if (row.acceptedAt) return 'This invitation was already used.';
  if (row.revokedAt) return `This invitation was withdrawn; ask ${whomToAsk(inviterName, teamName)} for a new one.`;
  if (row.expiresAt.getTime() <= now) return `This invitation has expired; ask ${whomToAsk(inviterName, teamName)} for a new one.`;
  return null;
}

function invitationMail(input: { teamName: string; inviterName: string; role: Role; link: string; expiresAt: Date }) {
  const until = input.expiresAt.toISOString().slice(0, 16).replace('T', ' ');
  const text = [
    `${input.inviterName} invited you to join ${input.teamName} on Slipless as ${input.role}.`,
    '',
    'Accept the invitation with this link (usable once, until ' + until + ' UTC):',
    '',
    input.link,
    '',
    'If you did not expect this invitation, ignore this e-mail.',
  ].join('\n');
  return { subject: `Join ${input.teamName} on Slipless`, text };
}

/** Unexpired invitations of a team that nobody has accepted or withdrawn, newest first. */
export async function listPendingInvitations(database: Database, teamId: string, now = Date.now()): Promise<PendingInvitation[]> {
  const rows = await database.db
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
      inviterId: users.id,
      inviterName: users.name,
      inviterEmail: users.email,
    })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(
      and(eq(invitations.teamId, teamId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date(now))),
    )
    .orderBy(desc(invitations.createdAt));
  return rows.map(({ inviterId, inviterName, inviterEmail, ...row }) => ({
    ...row,
    invitedBy: inviterId ? { id: inviterId, name: inviterName, email: inviterEmail } : null,
  }));
}

/**
 * Invites `email` into the team at `role` (the route has checked that the inviter may manage the
 * team): stores only the token's digest, e-mails the link `${origin}/invite/<token>` (valid for
 * 7 days, usable once) and withdraws earlier pending invitations of the same address, so only
 * the newest link works.
 */
export async function createInvitation(
  database: Database,
  input: { teamId: string; inviter: Identity['user']; email: string; role: Role; origin: string; address?: string | null; now?: number },
): Promise<Result<PendingInvitation>> {
  const now = input.now ?? Date.now();
  const email = normaliseEmail(input.email);
  const [team] = await database.db.select({ name: teams.name }).from(teams).where(eq(teams.id, input.teamId));
  if (!team) return fail({ kind: 'not-found', message: 'Not found.' });
  const existing = await findUserByEmail(database, email);
  const [member] = existing
    ? await database.db
        .select({ userId: memberships.userId })
        .from(memberships)
        .where(and(eq(memberships.teamId, input.teamId), eq(memberships.userId, existing.id)))
    : [];
  if (member) return fail({ kind: 'conflict', message: `${email} is already a member of this team.`, path: 'email' });

  const { token, hash } = generateSecretToken(INVITATION_TOKEN_PREFIX);
  const expiresAt = new Date(now + INVITATION_LIFETIME_MS);
  const created = await database.transaction(async (tx) => {
    await tx
      .update(invitations)
      .set({ revokedAt: new Date(now) })
      .where(and(eq(invitations.teamId, input.teamId), eq(invitations.email, email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    const [row] = await tx
      .insert(invitations)
      .values({ teamId: input.teamId, email, role: input.role, tokenHash: hash, invitedBy: input.inviter.id, expiresAt })
      .returning();
    return row;
  });

  const inviterName = input.inviter.name ?? input.inviter.email;
  const link = `${input.origin.replace(/\/+$/, '')}/invite/${token}`;
  try {
    await sendMail({ to: email, ...invitationMail({ teamName: team.name, inviterName, role: input.role, link, expiresAt }) });
  } catch (error) {
    // A link nobody received must not stay usable or listed as pending.
    await database.write((db) => db.delete(invitations).where(eq(invitations.id, created.id)));
    throw error;
  }
  await recordAudit(database, {
    teamId: input.teamId,
    actorId: input.inviter.id,
    action: 'team.invite',
    subject: email,
    detail: { invitationId: created.id, role: input.role },
    address: input.address ?? null,
  });
  return {
    ok: true,
    value: {
      id: created.id,
      email,
      role: created.role,
      expiresAt: created.expiresAt,
      createdAt: created.createdAt,
      invitedBy: { id: input.inviter.id, name: input.inviter.name, email: input.inviter.email },
    },
  };
}

/** Withdraws a pending invitation of the team; 404 when there is no such pending invitation. */
export async function revokeInvitation(
  database: Database,
  input: { teamId: string; invitationId: string; actorId: string; address?: string | null },
): Promise<Result<{ id: string; email: string }>> {
  const [row] = await database.write((db) =>
    db
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(
        and(eq(invitations.id, input.invitationId), eq(invitations.teamId, input.teamId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)),
      )
      .returning({ id: invitations.id, email: invitations.email }),
  );
  if (!row) return fail({ kind: 'not-found', message: 'No pending invitation with that id in this team.' });
  await recordAudit(database, {
    teamId: input.teamId,
    actorId: input.actorId,
    action: 'team.invite_revoked',
    subject: row.email,
    detail: { invitationId: row.id },
    address: input.address ?? null,
  });
  return { ok: true, value: row };
}

async function findByToken(database: Database, token: string) {
  const [row] = await database.db
    .select({ invitation: invitations, teamName: teams.name, inviterName: users.name })
    .from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashSecretToken(token)));
  return row ?? null;
}

/** The invitation behind a link, for the accept page; refused (404/410) when it cannot be used. */
export async function previewInvitation(database: Database, token: string, now = Date.now()): Promise<Result<InvitationPreview>> {
  const row = token.startsWith(INVITATION_TOKEN_PREFIX) ? await findByToken(database, token) : null;
  if (!row) return fail({ kind: 'not-found', message: 'This invitation link is not valid. Check that the whole link was copied.' });
  const why = refusal(row.invitation, row.inviterName, row.teamName, now);
  if (why) return fail({ kind: 'gone', message: why });
  return {
    ok: true,
    value: {
      email: row.invitation.email,
      role: row.invitation.role,
      teamName: row.teamName,
      inviterName: row.inviterName,
      expiresAt: row.invitation.expiresAt,
      hasAccount: (await findUserByEmail(database, row.invitation.email)) !== null,
    },
  };
}

/**
 * Accepts an invitation once: creates the account (name and password required, e-mail counted
 * as verified because the link reached it) when no user has the invited address, or adds the
 * membership to the existing user; a member already in the team keeps their current role.
 */
export async function acceptInvitation(
  database: Database,
  input: { token: string; name?: string; password?: string; address?: string | null; now?: number },
): Promise<Result<{ userId: string; email: string; teamId: string; role: Role; createdAccount: boolean }>> {
  const now = input.now ?? Date.now();
  const preview = await previewInvitation(database, input.token, now);
  if (!preview.ok) return preview;
  const { email } = preview.value;
  const needsAccount = !preview.value.hasAccount;
  if (needsAccount && !input.name?.trim()) return fail({ kind: 'invalid', message: 'Enter your name.', path: 'name' });
  if (needsAccount && !input.password) return fail({ kind: 'invalid', message: 'Choose a password.', path: 'password' });
  const passwordHash = needsAccount && input.password ? await hashPassword(input.password) : null;

  const outcome = await database.transaction(async (tx): Promise<Result<{ userId: string; teamId: string; role: Role; createdAccount: boolean; invitationId: string }>> => {
    // Re-read inside the queue: a second accept racing this one must see the first one's mark.
    const [invitation] = await tx.select().from(invitations).where(eq(invitations.tokenHash, hashSecretToken(input.token)));
    if (!invitation) return fail({ kind: 'not-found', message: 'This invitation link is not valid. Check that the whole link was copied.' });
    const why = refusal(invitation, preview.value.inviterName, preview.value.teamName, now);
    if (why) return fail({ kind: 'gone', message: why });
    const existing = await findUserByEmail(tx, email);
    let userId = existing?.id;
    if (!userId) {
      if (!passwordHash || !input.name?.trim()) return fail({ kind: 'conflict', message: 'The account changed meanwhile; reload the page and try again.' });
      const [created] = await createUsers(tx, [{ email, name: input.name.trim(), passwordHash, emailVerified: new Date(now) }]);
      userId = created.id;
    }
    await tx.insert(memberships).values({ teamId: invitation.teamId, userId, role: invitation.role }).onConflictDoNothing();
    await tx
      .update(invitations)
      .set({ acceptedAt: new Date(now) })
      .where(and(eq(invitations.id, invitation.id), isNull(invitations.acceptedAt)));
    const [membership] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.teamId, invitation.teamId), eq(memberships.userId, userId)));
    return { ok: true, value: { userId, teamId: invitation.teamId, role: membership.role, createdAccount: !existing, invitationId: invitation.id } };
  });
  if (!outcome.ok) return outcome;
  const { invitationId, ...accepted } = outcome.value;
  await recordAudit(database, {
    teamId: accepted.teamId,
    actorId: accepted.userId,
    action: 'team.invite_accepted',
    subject: email,
    detail: { invitationId, role: accepted.role, createdAccount: accepted.createdAccount },
    address: input.address ?? null,
  });
  return { ok: true, value: { ...accepted, email } };
}
