import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible';

/** Failed sign-ins allowed per account in the window before it is locked for the rest of it. */
const accountLimiter = new RateLimiterMemory({ keyPrefix: 'signin-account', points: 5, duration: 15 * 60 });
/** Sign-in attempts allowed per client address in the window. */
const addressLimiter = new RateLimiterMemory({ keyPrefix: 'signin-address', points: 30, duration: 15 * 60 });

/** Seconds until a sign-in for this account from this address may be tried again; 0 when allowed now. */
export async function signInRetryAfter(email: string, address: string): Promise<number> {
  const [account, origin] = await Promise.all([accountLimiter.get(email.toLowerCase()), addressLimiter.get(address)]);
  const blocked = [account, origin].filter((r): r is RateLimiterRes => !!r && r.remainingPoints <= 0);
  return blocked.length ? Math.ceil(Math.max(...blocked.map((r) => r.msBeforeNext)) / 1000) : 0;
}

/** Counts one sign-in attempt against the address, and a failure against the account. */
export async function countSignInAttempt(email: string, address: string, succeeded: boolean): Promise<void> {
  await addressLimiter.penalty(address, 1);
  if (succeeded) await accountLimiter.delete(email.toLowerCase());
  else await accountLimiter.penalty(email.toLowerCase(), 1);
}
