import { encode } from '@auth/core/jwt';
import { describe, expect, it, vi } from 'vitest';
import { readSessionCookie } from '../../../src/lib/server/session-cookie';
import { ORIGIN } from '../../helpers/api-context';

// Auth.js session cookies are JWE tokens named authjs.session-token (__Secure- prefixed over HTTPS)
// whose key is derived with the cookie name as salt (Auth.js documentation, "JWT" and "Cookies").
const NAME = 'authjs.session-token';
const secret = process.env.AUTH_SECRET!;
const claims = { sub: 'user-cookie-test', email: 'cookie@example.org', signedInAt: 1_700_000_000_000, sid: 'session-cookie-test' };

const cookieToken = (token: Record<string, unknown>, maxAge?: number, salt = NAME) => encode({ token, secret, salt, maxAge });
const request = (headers: Record<string, string>, url = `${ORIGIN}/api/me`) => new Request(url, { headers });
const read = (headers: Record<string, string>, url = `${ORIGIN}/api/me`) => readSessionCookie(request(headers, url), new URL(url));

describe('reading the session cookie', () => {
  it('gives the user, sign-in time and session id the session callback maps from the token, the same on a second read', async () => {
    const cookie = `${NAME}=${await cookieToken({ ...claims, sid: 'session-read-twice' })}`;
    const expected = { userId: claims.sub, signedInAt: claims.signedInAt, sessionId: 'session-read-twice' };
    expect(await read({ cookie })).toEqual(expected);
    expect(await read({ cookie })).toEqual(expected);
  });

  it('answers null without a session cookie, and for a token sent as an Authorization header (Auth.js reads sessions from cookies only)', async () => {
    expect(await read({})).toBeNull();
    expect(await read({ cookie: 'slipless-team=demo' })).toBeNull();
    expect(await read({ authorization: `Bearer ${await cookieToken(claims)}` })).toBeNull();
  });

  it('answers null for a session without an id, which could outlive a sign-out', async () => {
    const { sid: _sid, ...withoutId } = claims;
    expect(await read({ cookie: `${NAME}=${await cookieToken(withoutId)}` })).toBeNull();
  });

  it('stops accepting a cookie past its expiry although it was read while valid', async () => {
    const cookie = `${NAME}=${await cookieToken({ ...claims, sid: 'session-short' }, 60)}`;
    expect(await read({ cookie })).toMatchObject({ sessionId: 'session-short' });
    // Auth.js decodes with 15 s of clock tolerance (@auth/core jwt.js, jwtDecrypt clockTolerance), so the clock moves past both.
    vi.useFakeTimers({ toFake: ['Date'] });
    try {
      vi.setSystemTime(Date.now() + 60_000 + 16_000);
      expect(await read({ cookie })).toBeNull();
    } finally {
      vi.useRealTimers();
    }
  });

  it('reads the cookie name of the public scheme only: a plain-HTTP cookie is no session on an HTTPS origin, and the other way round', async () => {
    const plain = await cookieToken({ ...claims, sid: 'session-plain' });
    const secure = await cookieToken({ ...claims, sid: 'session-secure' }, undefined, `__Secure-${NAME}`);
    expect(await read({ cookie: `${NAME}=${plain}` }, 'https://slipless.example.org/api/me')).toBeNull();
    expect(await read({ cookie: `__Secure-${NAME}=${secure}` }, 'https://slipless.example.org/api/me')).toMatchObject({ sessionId: 'session-secure' });
    expect(await read({ cookie: `__Secure-${NAME}=${secure}` })).toBeNull();
  });
});
