import type { Database } from '../../db';
import { fail, succeed, type Result } from '../result';
import { notFound, type Identity } from './access';
import { recordAudit } from './audit';
import { hashPassword, verifyPassword } from './passwords';
import { clearThrottle, hitThrottles, type ThrottleRule } from './rate-limit';
import { findUserById, replacePassword } from './users';

const PASSWORD_CHANGE_WINDOW_MS = 15 * 60 * 1000;
/** Wrong current passwords per account: 5, then none for 15 min, so a left-open session cannot be used to guess it. */
const WRONG_CURRENT_PASSWORD: ThrottleRule = {
  scope: 'password-change',
  windowMs: PASSWORD_CHANGE_WINDOW_MS,
  freeHits: 5,
  firstDelayMs: PASSWORD_CHANGE_WINDOW_MS,
  maxDelayMs: PASSWORD_CHANGE_WINDOW_MS,
};

/**
 * Replaces the user's password after checking the current one and ends every session begun before
 * the change; recorded in the audit trail of every team the user belongs to.
 */
export async function changePassword(
  database: Database,
  identity: Identity,
  input: { currentPassword: string; newPassword: string },
  address: string | null = null,
): Promise<Result<void>> {
  const userId = identity.user.id;
  const user = await findUserById(database, userId);
  if (!user) return notFound();
  if (!user.passwordHash) {
    return fail({ kind: 'invalid', path: 'currentPassword', message: 'Your account signs in by e-mail link and has no password yet; use the password reset on the sign-in page to set one.' });
  }
  // Counted as wrong before the check, so parallel guesses cannot all get in under the limit.
  const throttle = { rule: WRONG_CURRENT_PASSWORD, id: userId };
  const counted = await hitThrottles(database, [throttle]);
  if (!counted.ok) {
    const minutes = Math.ceil(counted.retryAfterMs / 60_000);
    return fail({ kind: 'rate-limited', message: `Too many wrong passwords. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.` });
  }
  if (!(await verifyPassword(user.passwordHash, input.currentPassword))) {
    return fail({ kind: 'invalid', path: 'currentPassword', message: 'That is not your current password.' });
  }
  await clearThrottle(database, throttle);
  const passwordHash = await hashPassword(input.newPassword);
  // Every session begun before now ends, this one included; API tokens are separate credentials and stay.
  await database.write((db) => replacePassword(db, userId, { passwordHash, at: new Date() }));
  const teams = identity.memberships.length ? identity.memberships.map((m) => m.teamId) : [null];
  await recordAudit(
    database,
    teams.map((teamId) => ({ teamId, actorId: userId, action: 'auth.password_change', subject: `user:${userId}`, address })),
  );
  return succeed(undefined);
}
