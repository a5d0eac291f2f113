import { encode } from '@auth/core/jwt';
import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { endedSessions } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { GET as authGet, POST as authPost } from '../../../src/pages/api/auth/[...auth]';
import { GET as meRoute } from '../../../src/pages/api/me';
import { addTestMember, callThroughMiddleware, cookieJar, ORIGIN } from '../../helpers/api-context';

// Ending the session on the server at sign-out (not only deleting the cookie) is common practice.

const PASSWORD = 'a sign-out test password';

/** "name=value" pairs from a response's Set-Cookie headers. */
function cookiePairs(response: Response): string[] {
  return response.headers.getSetCookie().map((cookie) => cookie.split(';')[0]);
}

/** Calls the Auth.js endpoint like a browser form post would; cookies it sets come back as "name=value" pairs. */
async function authCall(handler: typeof authGet, path: string, init: RequestInit = {}): Promise<Response & { setCookies: string[] }> {
  const jar = cookieJar();
  const response = await handler({ request: new Request(`${ORIGIN}${path}`, init), cookies: jar, clientAddress: '127.0.0.1' } as never);
  return Object.assign(response, { setCookies: [...cookiePairs(response), ...[...jar.values].map(([name, value]) => `${name}=${value}`)] });
}

/** Signs in with e-mail and password through Auth.js and returns the session cookie ("name=value"). */
async function signInForCookie(email: string): Promise<string> {
  const csrf = await authCall(authGet, '/api/auth/csrf');
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const signIn = await authCall(authPost, '/api/auth/callback/credentials', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookiePairs(csrf).join('; '), 'x-auth-return-redirect': '1' },
    body: new URLSearchParams({ email, password: PASSWORD, csrfToken, callbackUrl: `${ORIGIN}/` }),
  });
  const session = signIn.setCookies.find((pair) => pair.split('=')[0].endsWith('authjs.session-token'));
  if (!session) throw new Error(`No session cookie after signing in (status ${signIn.status})`);
  return session;
}

/** Signs out the session behind `sessionCookie` through Auth.js, as the sign-out page's form does. */
async function signOut(sessionCookie: string): Promise<void> {
  const csrf = await authCall(authGet, '/api/auth/csrf', { headers: { cookie: sessionCookie } });
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const response = await authCall(authPost, '/api/auth/signout', {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: [sessionCookie, ...cookiePairs(csrf)].join('; '), 'x-auth-return-redirect': '1' },
    body: new URLSearchParams({ csrfToken, callbackUrl: `${ORIGIN}/` }),
  });
  expect(response.status).toBe(200);
}

const me = (cookie: string) => callThroughMiddleware(meRoute, { path: '/api/me', headers: { cookie } });

describe('signing out', () => {
  it('ends the session on the server: a copy of the cookie taken before sign-out is refused after it', async () => {
    const member = await addTestMember('editor', { password: PASSWORD });
    const copied = await signInForCookie(member.email);
    expect((await me(copied)).status).toBe(200);

    await signOut(copied);
    const after = await me(copied);
    expect(after.status).toBe(401);
  });

  it('ends only that session: another sign-in of the same person keeps working', async () => {
    const member = await addTestMember('viewer', { password: PASSWORD });
    const laptop = await signInForCookie(member.email);
    const phone = await signInForCookie(member.email);
    await signOut(laptop);
    expect((await me(laptop)).status).toBe(401);
    expect((await me(phone)).status).toBe(200);
  });

  it('counts a session cookie without a session id (issued before sign-out was recorded) as signed out', async () => {
    const member = await addTestMember('editor');
    const name = 'authjs.session-token';
    const claims = { sub: member.userId, email: member.email, signedInAt: Date.now() };
    const token = (sid?: string) => encode({ token: sid ? { ...claims, sid } : claims, secret: process.env.AUTH_SECRET!, salt: name });
    expect((await me(`${name}=${await token()}`)).status).toBe(401);
    expect((await me(`${name}=${await token(crypto.randomUUID())}`)).status).toBe(200);
  });

  it('refuses an ended session id in identityForUser and accepts a live one', async () => {
    const database = await getDatabase();
    const member = await addTestMember('reviewer');
    const ended = `test-ended-${crypto.randomUUID()}`;
    await database.write((db) => db.insert(endedSessions).values({ sessionId: ended, userId: member.userId, expiresAt: new Date(Date.now() + 60_000) }));
    expect(await identityForUser(database, member.userId, Date.now(), ended)).toBeNull();
    expect(await identityForUser(database, member.userId, Date.now(), `test-live-${crypto.randomUUID()}`)).not.toBeNull();
  });

  it('drops ended sessions whose cookies have expired anyway when the next session ends', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer', { password: PASSWORD });
    const stale = `test-stale-${crypto.randomUUID()}`;
    await database.write((db) => db.insert(endedSessions).values({ sessionId: stale, userId: member.userId, expiresAt: new Date(Date.now() - 1_000) }));
    await signOut(await signInForCookie(member.email));
    expect(await database.db.select().from(endedSessions).where(eq(endedSessions.sessionId, stale))).toEqual([]);
    expect((await database.db.select().from(endedSessions).where(eq(endedSessions.userId, member.userId))).length).toBe(1);
  });
});
