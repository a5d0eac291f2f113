import { getToken } from '@auth/core/jwt';
import authConfig from 'auth:config';
import { getSession } from 'auth-astro/server';
import { LRUCache } from 'lru-cache';

/** What the app reads from a session cookie: who, when they signed in (ms since the epoch), and which session. */
export interface SessionClaims {
  userId: string;
  signedInAt: number;
  sessionId: string;
}

/** Bounds of the decoded-cookie cache: entries (one per signed-in browser) and the longest any entry is kept. */
export const SESSION_CACHE = { max: 5_000, ttlMs: 10 * 60_000 } as const;

/**
 * Decoded session cookies by cookie value. Decoding one runs Auth.js's whole session handler (an
 * HKDF key derivation, a JWE decryption, a CSRF token and a re-encrypted cookie nobody reads): most
 * of a read request's CPU time. What a cookie decodes to depends only on its bytes, the cookie
 * name and the secret, so it is kept until the token's own expiry (at most SESSION_CACHE.ttlMs).
 * Whether the session still counts (signed out, password changed, user or membership gone) is never
 * cached: identityForUser asks the database on every request, on every instance.
 */
const decoded = new LRUCache<string, { claims: SessionClaims; expiresAt: number }>({ max: SESSION_CACHE.max, ttl: SESSION_CACHE.ttlMs });

/**
 * The claims of the request's session cookie, or null without one or for a session without an id
 * (begun before sign-out was recorded on the server, so it could outlive a sign-out). Auth.js names
 * its cookies after the scheme, so the cookie is read as on `publicUrl` (the request's URL on the
 * public origin). Throws what Auth.js throws for a cookie it cannot read (such as one signed with
 * an old secret).
 */
export async function readSessionCookie(request: Request, publicUrl: URL): Promise<SessionClaims | null> {
  const secureCookie = publicUrl.protocol === 'https:';
  // Only the cookie header: getToken would also take an Authorization header as the token, which Auth.js's session handler never reads.
  const cookieOnly = { headers: new Headers({ cookie: request.headers.get('cookie') ?? '' }) };
  const token = await getToken({ req: cookieOnly, secureCookie, raw: true });
  // No session cookie (chunks joined): Auth.js would answer an empty session.
  if (!token) return null;
  const key = `${secureCookie ? 'secure' : 'plain'} ${token}`;
  const known = decoded.get(key);
  // The cache's own clock is monotonic; the token's expiry is wall-clock time, checked as Auth.js checks it.
  if (known && Date.now() < known.expiresAt) return known.claims;

  const session = await getSession(new Request(publicUrl, { headers: request.headers }));
  const userId = (session?.user as { id?: string } | undefined)?.id;
  if (!userId || !session?.sessionId) return null;
  const claims: SessionClaims = { userId, signedInAt: session.signedInAt ?? 0, sessionId: session.sessionId };
  // The session answer carries a refreshed expiry, not the cookie's: the cookie's own comes from its token.
  const payload = await getToken({ req: cookieOnly, secureCookie, secret: authConfig.secret! });
  const expiresAt = typeof payload?.exp === 'number' ? payload.exp * 1000 : 0;
  if (expiresAt > Date.now()) decoded.set(key, { claims, expiresAt }, { ttl: Math.min(SESSION_CACHE.ttlMs, expiresAt - Date.now()) });
  return claims;
}
