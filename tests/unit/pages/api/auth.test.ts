import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { createHash } from 'node:crypto';
import { users, verificationTokens } from '../../../../src/db/schema';
import { getDatabase } from '../../../../src/lib/server/database';
import { verifyPassword } from '../../../../src/lib/server/passwords';
import { LINK_REQUEST_RECIPIENT } from '../../../../src/lib/server/rate-limit';
import { GET as authGet, POST as authPost } from '../../../../src/pages/api/auth/[...auth]';
import { addTestMember, cookieJar, ORIGIN } from '../../../helpers/api-context';
import { mailsTo, startTestOutbox, waitForMail, type TestOutbox } from '../../../helpers/mail';

vi.mock('../../../../src/lib/server/passwords', async (importOriginal) => {
  const actual = await importOriginal<typeof import('../../../../src/lib/server/passwords')>();
  return { ...actual, verifyPassword: vi.fn(actual.verifyPassword) };
});

let smtp: TestOutbox;

beforeAll(async () => {
  smtp = await startTestOutbox();
});

afterAll(async () => {
  await smtp?.close();
});

beforeEach(() => {
  vi.mocked(verifyPassword).mockClear();
});

/** What a browser or script can see of an answer from the Auth.js endpoint. */
interface Visible {
  status: number;
  location: string | null;
  body: string;
  cookies: string[];
}

/** Posts a form to the Auth.js endpoint from `address`, with a fresh CSRF token and its cookie. */
async function postAuth(path: string, fields: Record<string, string>, address: string, { returnRedirect = false } = {}): Promise<Visible> {
  const csrf = await authGet({ request: new Request(`${ORIGIN}/api/auth/csrf`), cookies: cookieJar(), clientAddress: address } as never);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const jar = cookieJar();
  const response = await authPost({
    request: new Request(`${ORIGIN}${path}`, {
      method: 'POST',
      headers: {
        'content-type': 'application/x-www-form-urlencoded',
        cookie,
        ...(returnRedirect ? { 'x-auth-return-redirect': '1' } : {}),
      },
      body: new URLSearchParams({ ...fields, csrfToken, callbackUrl: `${ORIGIN}/sheets` }),
    }),
    cookies: jar,
    clientAddress: address,
  } as never);
  return { status: response.status, location: response.headers.get('location'), body: await response.text(), cookies: [...jar.values.keys()].sort() };
}

const requestLink = (email: string, address: string, options?: { returnRedirect?: boolean }) =>
  postAuth('/api/auth/signin/nodemailer', { email }, address, options);
const signInWithPassword = (email: string, password: string, address: string) =>
  postAuth('/api/auth/callback/credentials', { email, password }, address);

const unique = (label: string) => `${label}-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
const settle = () => new Promise((r) => setTimeout(r, 300));

describe('e-mail sign-in link', () => {
  it('answers a known and an unknown address with the same status, Location, body and cookies, and mails only the known one', async () => {
    const member = await addTestMember('viewer');
    const unknown = unique('nobody');
    for (const returnRedirect of [false, true]) {
      const known = await requestLink(member.email, '192.0.2.21', { returnRedirect });
      const stranger = await requestLink(unknown, '192.0.2.21', { returnRedirect });
      expect(stranger).toEqual(known);
      if (returnRedirect) expect(new URL(JSON.parse(known.body).url).pathname).toBe('/api/auth/verify-request');
      else expect(known).toMatchObject({ status: 302, location: `${ORIGIN}/api/auth/verify-request?provider=nodemailer&type=email` });
    }
    expect((await waitForMail(member.email)).subject).toBe('Your Slipless sign-in link');
    await settle();
    expect(await mailsTo(unknown)).toEqual([]);
    const database = await getDatabase();
    expect(await database.db.select().from(users).where(eq(users.email, unknown))).toEqual([]);
  });

  it('creates no account from a link for an address without one', async () => {
    // A link request for an unknown address stores a token too (never mailed); following one must not make an account.
    const unknown = unique('nobody');
    const token = crypto.randomUUID();
    const database = await getDatabase();
    await database.write((db) =>
      db.insert(verificationTokens).values({
        identifier: unknown,
        token: createHash('sha256').update(`${token}${process.env.AUTH_SECRET}`).digest('hex'),
        expires: new Date(Date.now() + 60_000),
      }),
    );
    const link = `${ORIGIN}/api/auth/callback/nodemailer?${new URLSearchParams({ callbackUrl: `${ORIGIN}/`, token, email: unknown })}`;
    const followed = await authGet({ request: new Request(link), cookies: cookieJar(), clientAddress: '192.0.2.22' } as never);
    expect(followed.headers.get('location')).toMatch(/\/sign-in\?error=AccessDenied/);
    expect(await database.db.select().from(users).where(eq(users.email, unknown))).toEqual([]);
  });

  it('answers the same once a recipient is over its limit, and mails nothing more', async () => {
    const member = await addTestMember('viewer');
    const answers: Visible[] = [];
    for (let i = 0; i <= LINK_REQUEST_RECIPIENT.freeHits; i++) answers.push(await requestLink(member.email, `192.0.2.${30 + i}`));
    expect(new Set(answers.map((a) => JSON.stringify(a))).size).toBe(1);
    for (let waited = 0; (await mailsTo(member.email)).length < LINK_REQUEST_RECIPIENT.freeHits && waited < 5_000; waited += 50) {
      await new Promise((r) => setTimeout(r, 50));
    }
    await settle();
    expect(await mailsTo(member.email)).toHaveLength(LINK_REQUEST_RECIPIENT.freeHits);
  });
});

describe('password sign-in', () => {
  it('checks exactly one argon2 hash whether the account exists, has no password, or has one', async () => {
    const withPassword = await addTestMember('viewer', { password: 'the right password' });
    const linkOnly = await addTestMember('viewer');
    const database = await getDatabase();
    await database.write((db) => db.update(users).set({ passwordHash: null }).where(eq(users.id, linkOnly.userId)));

    const answers: Visible[] = [];
    for (const email of [withPassword.email, linkOnly.email, unique('nobody')]) {
      vi.mocked(verifyPassword).mockClear();
      answers.push(await signInWithPassword(email, 'a wrong password', '192.0.2.41'));
      expect(verifyPassword).toHaveBeenCalledTimes(1);
    }
    expect(answers[1]).toEqual(answers[0]);
    expect(answers[2]).toEqual(answers[0]);
    expect(answers[0].location).toBe(`${ORIGIN}/sign-in?error=CredentialsSignin&code=credentials`);
  });

  it('lets the owner in from their address while an attacker has failed 20 times from another', async () => {
    const owner = await addTestMember('owner', { password: 'the owner password' });
    const outcomes = [];
    for (let i = 0; i < 20; i++) outcomes.push(new URL((await signInWithPassword(owner.email, `guess ${i}`, '203.0.113.51')).location!).searchParams.get('code'));
    expect(outcomes.slice(0, 3)).toEqual(['credentials', 'credentials', 'credentials']);
    expect(outcomes.at(-1)).toBe('rate_limited');

    const signedIn = await signInWithPassword(owner.email, 'the owner password', '192.0.2.42');
    expect(signedIn.location).toBe(`${ORIGIN}/sheets`);
    expect(signedIn.cookies.some((name) => name.endsWith('authjs.session-token'))).toBe(true);
  });
});
