import { and, eq, gte, inArray, isNull, lt, lte, or, sql, type SQL } from 'drizzle-orm';
import type { Database } from '../../db';
import { rateLimits } from '../../db/schema';
import { normaliseEmail } from './users';

const SECOND = 1_000;
const MINUTE = 60 * SECOND;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/**
 * How one kind of attempt is counted (in `rate_limits`, shared by every app instance) and slowed
 * down: `freeHits` hits in a window go through back to back; after each further hit the next one
 * waits `firstDelayMs`, then twice that, and so on up to `maxDelayMs`.
 */
export interface ThrottleRule {
  /** Prefix of this rule's keys; letters and dashes. */
  readonly scope: string;
  /** Counting starts over this long after a window's first hit (ms). */
  readonly windowMs: number;
  readonly freeHits: number;
  readonly firstDelayMs: number;
  readonly maxDelayMs: number;
}

/** One counter: a rule and what it counts for (an address, an account, ...). */
export interface Throttle {
  readonly rule: ThrottleRule;
  readonly id: string;
}

export type ThrottleOutcome = { ok: true } | { ok: false; retryAfterMs: number };

/** Failed passwords per account and address: 3 back to back, then 1 s, 2 s, 4 s … up to 5 min; a success clears it. */
export const SIGN_IN_ACCOUNT_ADDRESS: ThrottleRule = { scope: 'signin-account-address', windowMs: DAY, freeHits: 3, firstDelayMs: SECOND, maxDelayMs: 5 * MINUTE };
/** Failed passwords from one address over all accounts: 30 an hour back to back, then 1 s doubling up to 5 min. */
export const SIGN_IN_ADDRESS: ThrottleRule = { scope: 'signin-address', windowMs: HOUR, freeHits: 30, firstDelayMs: SECOND, maxDelayMs: 5 * MINUTE };
/** Failed passwords per account from every address: 50 an hour back to back, then 1 s doubling up to 30 s (never for addresses it recently signed in from). */
export const SIGN_IN_ACCOUNT: ThrottleRule = { scope: 'signin-account', windowMs: HOUR, freeHits: 50, firstDelayMs: SECOND, maxDelayMs: 30 * SECOND };
/** Addresses an account signed in from within this window skip SIGN_IN_ACCOUNT, so a spread-out guesser cannot hold its owner up. */
const SIGN_IN_KNOWN_ADDRESS: ThrottleRule = { scope: 'signin-known-address', windowMs: 30 * DAY, freeHits: 0, firstDelayMs: 0, maxDelayMs: 0 };
/** Sign-in link requests from one address: 10 back to back, then none for 15 min. */
export const LINK_REQUEST_ADDRESS: ThrottleRule = { scope: 'link-address', windowMs: 15 * MINUTE, freeHits: 10, firstDelayMs: 15 * MINUTE, maxDelayMs: 15 * MINUTE };
/** Sign-in link mails to one address: 3 back to back (a lost mail or two), then none for 15 min. */
export const LINK_REQUEST_RECIPIENT: ThrottleRule = { scope: 'link-recipient', windowMs: 15 * MINUTE, freeHits: 3, firstDelayMs: 15 * MINUTE, maxDelayMs: 15 * MINUTE };

/** Rows of a rule are pruned at most this often per connection, by whichever hit comes along. */
const PRUNE_INTERVAL_MS = 5 * MINUTE;
/** Doublings beyond which every delay has long reached its cap; keeps the shift inside 64 bits. */
const MAX_DOUBLINGS = 40;

const lastPruned = new WeakMap<Database, Map<string, number>>();

function keyOf({ rule, id }: Throttle): string {
  return `${rule.scope}:${id}`;
}

/** The block (ms since the epoch) that `hits` in a window earn at `now`, as SQL; NULL below the free hits. */
function blockAfter(rule: ThrottleRule, hits: SQL, now: number): SQL {
  return sql`CASE WHEN ${hits} < ${rule.freeHits} THEN NULL
    ELSE ${now} + min(${rule.maxDelayMs}, ${rule.firstDelayMs} * (1 << min(${hits} - ${rule.freeHits}, ${MAX_DOUBLINGS}))) END`;
}

/** Milliseconds until every one of `throttles` lets a hit through; 0 when they do now. */
export async function throttleWaitMs(database: Database, throttles: readonly Throttle[], now = Date.now()): Promise<number> {
  if (!throttles.length) return 0;
  const rows = await database.db
    .select({ blockedUntil: rateLimits.blockedUntil })
    .from(rateLimits)
    .where(inArray(rateLimits.key, throttles.map(keyOf)));
  return Math.max(0, ...rows.map((r) => (r.blockedUntil ? r.blockedUntil.getTime() - now : 0)));
}

/**
 * Counts one hit on a throttle unless it is blocked; one statement, so instances sharing the
 * database count together and parallel requests cannot all pass before any is counted.
 */
async function hitOne(database: Database, throttle: Throttle, now: number): Promise<boolean> {
  const { rule } = throttle;
  const windowOver = sql`${rateLimits.windowStartedAt} <= ${now - rule.windowMs}`;
  const hits = sql`(CASE WHEN ${windowOver} THEN 1 ELSE ${rateLimits.hits} + 1 END)`;
  const firstBlock = rule.freeHits <= 1 ? new Date(now + Math.min(rule.maxDelayMs, rule.firstDelayMs * 2 ** (1 - rule.freeHits))) : null;
  const counted = await database.write((db) =>
    db
      .insert(rateLimits)
      .values({ key: keyOf(throttle), hits: 1, windowStartedAt: new Date(now), blockedUntil: firstBlock })
      .onConflictDoUpdate({
        target: rateLimits.key,
        set: {
          hits,
          windowStartedAt: sql`CASE WHEN ${windowOver} THEN ${now} ELSE ${rateLimits.windowStartedAt} END`,
          blockedUntil: blockAfter(rule, hits, now),
        },
        setWhere: or(isNull(rateLimits.blockedUntil), lte(rateLimits.blockedUntil, new Date(now))),
      })
      .returning({ hits: rateLimits.hits }),
  );
  return counted.length > 0;
}

/** Takes back one hit (an attempt that turned out fine); the block stays only while the rest still earns one. */
async function refundOne(database: Database, throttle: Throttle): Promise<void> {
  await database.write((db) =>
    db
      .update(rateLimits)
      .set({
        hits: sql`max(${rateLimits.hits} - 1, 0)`,
        blockedUntil: sql`CASE WHEN ${rateLimits.hits} - 1 < ${throttle.rule.freeHits} THEN NULL ELSE ${rateLimits.blockedUntil} END`,
      })
      .where(eq(rateLimits.key, keyOf(throttle))),
  );
}

/** Forgets every hit on a throttle. */
export async function clearThrottle(database: Database, throttle: Throttle): Promise<void> {
  await database.write((db) => db.delete(rateLimits).where(eq(rateLimits.key, keyOf(throttle))));
}

/** Deletes a rule's rows whose window and block are both over, at most every PRUNE_INTERVAL_MS. */
async function pruneRule(database: Database, rule: ThrottleRule, now: number): Promise<void> {
  const pruned = lastPruned.get(database) ?? new Map<string, number>();
  lastPruned.set(database, pruned);
  if (now - (pruned.get(rule.scope) ?? -Infinity) < PRUNE_INTERVAL_MS) return;
  pruned.set(rule.scope, now);
  await database.write((db) =>
    db
      .delete(rateLimits)
      .where(
        and(
          // ';' follows ':' in code point order, so this range is exactly the rule's keys (and uses the primary key index).
          gte(rateLimits.key, `${rule.scope}:`),
          lt(rateLimits.key, `${rule.scope};`),
          lte(rateLimits.windowStartedAt, new Date(now - rule.windowMs)),
          or(isNull(rateLimits.blockedUntil), lte(rateLimits.blockedUntil, new Date(now))),
        ),
      ),
  );
}

/**
 * Counts one hit on every throttle, or on none: when one of them is blocked, the hits already
 * counted are taken back and the wait is returned.
 */
export async function hitThrottles(database: Database, throttles: readonly Throttle[], now = Date.now()): Promise<ThrottleOutcome> {
  const waitMs = await throttleWaitMs(database, throttles, now);
  if (waitMs > 0) return { ok: false, retryAfterMs: waitMs };
  const counted: Throttle[] = [];
  for (const throttle of throttles) {
    if (!(await hitOne(database, throttle, now))) {
      for (const done of counted) await refundOne(database, done);
      return { ok: false, retryAfterMs: Math.max(1, await throttleWaitMs(database, [throttle], now)) };
    }
    counted.push(throttle);
  }
  for (const rule of new Set(throttles.map((t) => t.rule))) await pruneRule(database, rule, now);
  return { ok: true };
}

/** A password sign-in under way: counted as failed until `finishSignIn` says otherwise. */
export interface SignInAttempt {
  readonly email: string;
  /** The client's address block (see addressBlock). */
  readonly address: string;
  readonly counted: readonly Throttle[];
}

/**
 * The part of a client address one party holds: IPv4 as is (also when IPv4-mapped), IPv6 by its
 * /64, since one host or home network commonly gets a whole /64 and could step through it.
 */
export function addressBlock(address: string): string {
  const v4 = /^(?:::ffff:)?(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(address);
  if (v4) return v4[1];
  if (!address.includes(':')) return address;
  const [head, tail] = address.split('%')[0].toLowerCase().split('::');
  const left = head ? head.split(':') : [];
  const right = tail ? tail.split(':') : [];
  const groups = [...left, ...Array<string>(Math.max(0, 8 - left.length - right.length)).fill('0'), ...right];
  return `${groups.slice(0, 4).map((g) => g.replace(/^0+(?=.)/, '')).join(':')}::/64`;
}

/**
 * Counts a password sign-in before the password is checked (so parallel guesses cannot all slip
 * through), or says how long to wait. Delays grow per account and address and per address; the
 * account-wide count, meant for guessers spread over many addresses, spares addresses the account
 * signed in from lately.
 */
export async function startSignIn(
  database: Database,
  input: { email: string; address: string },
  now = Date.now(),
): Promise<{ ok: true; attempt: SignInAttempt } | { ok: false; retryAfterMs: number }> {
  const email = normaliseEmail(input.email);
  const address = addressBlock(input.address);
  const known = { rule: SIGN_IN_KNOWN_ADDRESS, id: `${email}|${address}` };
  const [row] = await database.db
    .select({ at: rateLimits.windowStartedAt })
    .from(rateLimits)
    .where(and(eq(rateLimits.key, keyOf(known)), gte(rateLimits.windowStartedAt, new Date(now - SIGN_IN_KNOWN_ADDRESS.windowMs))));
  const counted: Throttle[] = [
    { rule: SIGN_IN_ADDRESS, id: address },
    { rule: SIGN_IN_ACCOUNT_ADDRESS, id: `${email}|${address}` },
    ...(row ? [] : [{ rule: SIGN_IN_ACCOUNT, id: email }]),
  ];
  const outcome = await hitThrottles(database, counted, now);
  return outcome.ok ? { ok: true, attempt: { email, address, counted } } : outcome;
}

/** Settles a started sign-in: a success takes its hits back, clears its account-and-address count and remembers the address. */
export async function finishSignIn(database: Database, attempt: SignInAttempt, succeeded: boolean, now = Date.now()): Promise<void> {
  if (!succeeded) return;
  const pair = `${attempt.email}|${attempt.address}`;
  for (const throttle of attempt.counted) if (throttle.rule !== SIGN_IN_ACCOUNT_ADDRESS) await refundOne(database, throttle);
  await clearThrottle(database, { rule: SIGN_IN_ACCOUNT_ADDRESS, id: pair });
  const known = keyOf({ rule: SIGN_IN_KNOWN_ADDRESS, id: pair });
  await database.write((db) =>
    db
      .insert(rateLimits)
      .values({ key: known, hits: 0, windowStartedAt: new Date(now) })
      .onConflictDoUpdate({ target: rateLimits.key, set: { windowStartedAt: new Date(now) } }),
  );
  await pruneRule(database, SIGN_IN_KNOWN_ADDRESS, now);
}

/** True when a sign-in link may be mailed to `email` for a request from `address`; counts the request. */
export async function allowSignInLink(database: Database, input: { email: string; address: string }, now = Date.now()): Promise<boolean> {
  const throttles = [
    { rule: LINK_REQUEST_ADDRESS, id: addressBlock(input.address) },
    { rule: LINK_REQUEST_RECIPIENT, id: normaliseEmail(input.email) },
  ];
  return (await hitThrottles(database, throttles, now)).ok;
}
