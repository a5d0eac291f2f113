import { and, eq, isNull } from 'drizzle-orm';
import type { Database } from '../../db';
import { passwordResets, users } from '../../db/schema';
import { fail, type Result } from '../result';
import { recordAudit } from './audit';
import { sendMail } from './email';
import { getMemberships } from './identity';
import { hashPassword } from './passwords';
import { addressBlock, hitThrottles, type ThrottleRule } from './rate-limit';
import { generateSecretToken, hashSecretToken } from './tokens';
import { findUserByEmail, normaliseEmail, replacePassword } from './users';

export const PASSWORD_RESET_TOKEN_PREFIX = 'pwr_';
export const PASSWORD_RESET_LIFETIME_MS = 60 * 60 * 1000;

const RESET_LIMIT_WINDOW_MS = 15 * 60 * 1000;
/** Reset mails per recipient: 3 back to back (a lost mail or two, too few to flood an inbox), then none for 15 min. */
const RESET_RECIPIENT: ThrottleRule = {
  scope: 'reset-recipient',
  windowMs: RESET_LIMIT_WINDOW_MS,
  freeHits: 3,
  firstDelayMs: RESET_LIMIT_WINDOW_MS,
  maxDelayMs: RESET_LIMIT_WINDOW_MS,
};
/** Reset requests per client address: 20 back to back, then none for 15 min. */
const RESET_ADDRESS: ThrottleRule = { ...RESET_RECIPIENT, scope: 'reset-address', freeHits: 20 };

/**
 * Sends a one-hour, single-use reset link `${origin}/reset-password/<token>` when `email` belongs
 * to an account; otherwise (or when over the rate limits) does nothing. Callers answer the same in
 * every case, so the answer does not reveal which addresses have accounts.
 */
export async function requestPasswordReset(
  database: Database,
  input: { email: string; origin: string; address?: string | null; now?: number },
): Promise<void> {
  const now = input.now ?? Date.now();
  const email = normaliseEmail(input.email);
  const throttles = [
    { rule: RESET_ADDRESS, id: addressBlock(input.address ?? 'unknown') },
    { rule: RESET_RECIPIENT, id: email },
  ];
  if (!(await hitThrottles(database, throttles, now)).ok) return;
  const user = await findUserByEmail(database, email);
  if (!user) return;

  const { token, hash } = generateSecretToken(PASSWORD_RESET_TOKEN_PREFIX);
  await database.transaction(async (tx) => {
    // Only the newest link works, so an older mail lying around cannot be used.
    await tx.delete(passwordResets).where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt)));
    await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt: new Date(now + PASSWORD_RESET_LIFETIME_MS) });
  });
  const link = `${input.origin.replace(/\/+$/, '')}/reset-password/${token}`;
  await sendMail({
    to: email,
    subject: 'Reset your Slipless password',
    text: [
      'Someone asked to reset the password of your Slipless account.',
      '',
      'Choose a new password with this link (usable once, for 1 hour):',
      '',
      link,
      '',
      'If it was not you, ignore this e-mail: your password stays as it is.',
    ].join('\n'),
  });
}

/** Where a reset link stands, for the page that asks for the new password. */
export async function checkPasswordResetToken(database: Database, token: string, now = Date.now()): Promise<Result<{ email: string }>> {
  const row = token.startsWith(PASSWORD_RESET_TOKEN_PREFIX)
    ? (
        await database.db
          .select({ reset: passwordResets, email: users.email })
          .from(passwordResets)
          .innerJoin(users, eq(users.id, passwordResets.userId))
          .where(eq(passwordResets.tokenHash, hashSecretToken(token)))
      )[0]
    : undefined;
  if (!row?.email) return fail({ kind: 'not-found', message: 'This reset link is not valid. Check that the whole link was copied, or ask for a new one.', path: 'token' });
  if (row.reset.usedAt) return fail({ kind: 'gone', message: 'This reset link was already used. Ask for a new one if you need to reset again.', path: 'token' });
  if (row.reset.expiresAt.getTime() <= now) return fail({ kind: 'gone', message: 'This reset link has expired; ask for a new one.', path: 'token' });
  return { ok: true, value: { email: row.email } };
}

/** Sets the new password (argon2id) once per link and records it in the audit trail of every team of the user. */
export async function confirmPasswordReset(
  database: Database,
  input: { token: string; password: string; address?: string | null; now?: number },
): Promise<Result<{ userId: string; email: string }>> {
  const now = input.now ?? Date.now();
  const checked = await checkPasswordResetToken(database, input.token, now);
  if (!checked.ok) return checked;
  const passwordHash = await hashPassword(input.password);
  const userId = await database.transaction(async (tx) => {
    // The conditional mark makes the link single-use even if two submissions race.
    const [used] = await tx
      .update(passwordResets)
      .set({ usedAt: new Date(now) })
      .where(and(eq(passwordResets.tokenHash, hashSecretToken(input.token)), isNull(passwordResets.usedAt)))
      .returning({ userId: passwordResets.userId });
    if (!used) return null;
    await replacePassword(tx, used.userId, { passwordHash, at: new Date(now), emailVerified: new Date(now) });
    return used.userId;
  });
  if (!userId) return fail({ kind: 'gone', message: 'This reset link was already used. Ask for a new one if you need to reset again.', path: 'token' });
  const teams = await getMemberships(database, userId);
  await recordAudit(
    database,
    (teams.length ? teams.map((t) => t.teamId) : [null]).map((teamId) => ({
      teamId,
      actorId: userId,
      action: 'auth.password_reset',
      address: input.address ?? null,
    })),
  );
  return { ok: true, value: { userId, email: checked.value.email } };
}
