import { afterEach, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { rateLimits } from '../../../src/db/schema';
import {
  allowSignInLink,
  finishSignIn,
  hitThrottles,
  LINK_REQUEST_RECIPIENT,
  SIGN_IN_ACCOUNT,
  SIGN_IN_ACCOUNT_ADDRESS,
  SIGN_IN_ADDRESS,
  startSignIn,
  type ThrottleRule,
} from '../../../src/lib/server/rate-limit';
import { tempDatabaseUrl } from '../../helpers/temp';

const opened: Database[] = [];
const T0 = Date.UTC(2026, 0, 5, 9, 0, 0);

async function open(url: string, migrate = false): Promise<Database> {
  const database = await openDatabase(url);
  opened.push(database);
  if (migrate) await migrateDatabase(database);
  return database;
}

afterEach(() => {
  opened.splice(0).forEach((d) => d.close());
});

/** One wrong password: starts the attempt and reports it failed; the refusal when throttled. */
async function failSignIn(database: Database, email: string, address: string, now: number) {
  const attempt = await startSignIn(database, { email, address }, now);
  if (attempt.ok) await finishSignIn(database, attempt.attempt, false, now);
  return attempt;
}

describe('sign-in throttling kept in the database', () => {
  it('counts failures from two app instances on one database together, and a restart keeps the count', async () => {
    const url = tempDatabaseUrl();
    const a = await open(url, true);
    const b = await open(url);
    const [email, address] = ['owner@team.example', '198.51.100.7'];
    for (const [i, instance] of [a, b, a].entries()) expect((await failSignIn(instance, email, address, T0 + i)).ok).toBe(true);
    expect(await failSignIn(b, email, address, T0 + 3)).toEqual({ ok: false, retryAfterMs: SIGN_IN_ACCOUNT_ADDRESS.firstDelayMs - 1 });

    opened.splice(0).forEach((d) => d.close());
    const restarted = await open(url);
    expect(await startSignIn(restarted, { email, address }, T0 + 3)).toMatchObject({ ok: false });
    expect(await startSignIn(restarted, { email, address }, T0 + 2 + SIGN_IN_ACCOUNT_ADDRESS.firstDelayMs)).toMatchObject({ ok: true });
  });

  it('makes each further failure from one address wait twice as long, up to the cap', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const [email, address] = ['owner@team.example', '198.51.100.7'];
    let now = T0;
    for (let i = 0; i < SIGN_IN_ACCOUNT_ADDRESS.freeHits; i++) expect((await failSignIn(database, email, address, now)).ok).toBe(true);
    const waits: number[] = [];
    for (let i = 0; i < 12; i++) {
      const refused = await startSignIn(database, { email, address }, now);
      if (refused.ok) throw new Error('a failure past the free ones must wait');
      waits.push(refused.retryAfterMs);
      now += refused.retryAfterMs;
      expect((await failSignIn(database, email, address, now)).ok).toBe(true);
    }
    expect(waits.slice(0, 5)).toEqual([1_000, 2_000, 4_000, 8_000, 16_000]);
    expect(waits.at(-1)).toBe(SIGN_IN_ACCOUNT_ADDRESS.maxDelayMs);
    expect(Math.max(...waits)).toBe(SIGN_IN_ACCOUNT_ADDRESS.maxDelayMs);
  });

  it('lets the owner in from their own address at once while an attacker fails 20 times from another', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const email = 'owner@team.example';
    let now = T0;
    let refusedAttacker = 0;
    for (let tries = 0; tries < 20; ) {
      const attempt = await failSignIn(database, email, '203.0.113.66', now);
      if (attempt.ok) tries++;
      else {
        refusedAttacker++;
        now += attempt.retryAfterMs;
      }
    }
    expect(refusedAttacker).toBeGreaterThan(0);
    const owner = await startSignIn(database, { email, address: '192.0.2.10' }, now);
    expect(owner.ok).toBe(true);
    expect(await startSignIn(database, { email, address: '203.0.113.66' }, now)).toMatchObject({ ok: false });
  });

  it('clears the count of an account and address when that address signs in', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const [email, address] = ['owner@team.example', '192.0.2.10'];
    for (let i = 0; i < SIGN_IN_ACCOUNT_ADDRESS.freeHits - 1; i++) await failSignIn(database, email, address, T0 + i);
    const success = await startSignIn(database, { email, address }, T0 + 10);
    if (!success.ok) throw new Error('expected to be let in');
    await finishSignIn(database, success.attempt, true, T0 + 10);
    for (let i = 0; i < SIGN_IN_ACCOUNT_ADDRESS.freeHits; i++) expect((await failSignIn(database, email, address, T0 + 20 + i)).ok).toBe(true);
  });

  it('slows a guesser spread over many addresses, but not the owner at an address they signed in from', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const email = 'owner@team.example';
    const home = '192.0.2.10';
    const signedIn = await startSignIn(database, { email, address: home }, T0);
    if (!signedIn.ok) throw new Error('expected to be let in');
    await finishSignIn(database, signedIn.attempt, true, T0);

    for (let i = 0; i < SIGN_IN_ACCOUNT.freeHits; i++) expect((await failSignIn(database, email, `10.0.${i >> 8}.${i & 255}`, T0 + 1_000)).ok).toBe(true);
    const stranger = await startSignIn(database, { email, address: '10.9.9.9' }, T0 + 1_000);
    expect(stranger).toEqual({ ok: false, retryAfterMs: SIGN_IN_ACCOUNT.firstDelayMs });
    expect((await startSignIn(database, { email, address: home }, T0 + 1_000)).ok).toBe(true);
  });

  it('lets no more parallel guesses through than the free ones', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const attempts = await Promise.all(
      Array.from({ length: 10 }, () => startSignIn(database, { email: 'owner@team.example', address: '203.0.113.66' }, T0)),
    );
    expect(attempts.filter((a) => a.ok)).toHaveLength(SIGN_IN_ACCOUNT_ADDRESS.freeHits);
  });

  it('counts IPv6 addresses by their /64, which one host or home network commonly holds whole, and IPv4-mapped ones as IPv4', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const email = 'owner@team.example';
    for (let i = 1; i <= SIGN_IN_ACCOUNT_ADDRESS.freeHits; i++) expect((await failSignIn(database, email, `2001:db8:1:2::${i}`, T0)).ok).toBe(true);
    expect(await startSignIn(database, { email, address: '2001:0db8:0001:0002:ffff:0:0:9' }, T0)).toMatchObject({ ok: false });
    expect((await startSignIn(database, { email, address: '2001:db8:1:3::1' }, T0)).ok).toBe(true);

    for (let i = 0; i < SIGN_IN_ACCOUNT_ADDRESS.freeHits; i++) await failSignIn(database, email, '::ffff:198.51.100.7', T0);
    expect(await startSignIn(database, { email, address: '198.51.100.7' }, T0)).toMatchObject({ ok: false });
  });

  it('counts an address over every account it tries', async () => {
    const database = await open(tempDatabaseUrl(), true);
    for (let i = 0; i < SIGN_IN_ADDRESS.freeHits; i++) expect((await failSignIn(database, `user${i}@team.example`, '203.0.113.66', T0)).ok).toBe(true);
    expect(await startSignIn(database, { email: 'someone@team.example', address: '203.0.113.66' }, T0)).toMatchObject({ ok: false });
    expect((await startSignIn(database, { email: 'someone@team.example', address: '192.0.2.10' }, T0)).ok).toBe(true);
  });
});

describe('sign-in link requests', () => {
  it('allows a few links per recipient, then none until the window has passed', async () => {
    const database = await open(tempDatabaseUrl(), true);
    const email = 'owner@team.example';
    const allowed = [];
    for (let i = 0; i < LINK_REQUEST_RECIPIENT.freeHits + 2; i++) allowed.push(await allowSignInLink(database, { email, address: `10.0.0.${i}` }, T0 + i));
    expect(allowed).toEqual([...Array(LINK_REQUEST_RECIPIENT.freeHits).fill(true), false, false]);
    expect(await allowSignInLink(database, { email, address: '10.0.1.1' }, T0 + LINK_REQUEST_RECIPIENT.maxDelayMs + 10)).toBe(true);
  });
});

describe('throttle rows', () => {
  const rule: ThrottleRule = { scope: 'test-rule', windowMs: 60_000, freeHits: 1, firstDelayMs: 1_000, maxDelayMs: 1_000 };

  it('prunes rows whose window and wait have passed when later hits come in', async () => {
    const database = await open(tempDatabaseUrl(), true);
    await hitThrottles(database, [{ rule, id: 'old' }], T0);
    await hitThrottles(database, [{ rule, id: 'new' }], T0 + 10 * 60_000);
    await hitThrottles(database, [{ rule, id: 'newer' }], T0 + 20 * 60_000);
    const keys = (await database.db.select({ key: rateLimits.key }).from(rateLimits)).map((r) => r.key).sort();
    expect(keys).not.toContain('test-rule:old');
    expect(keys).toContain('test-rule:newer');
  });
});
