import { defineMiddleware } from 'astro:middleware';
import type { APIContext, MiddlewareNext } from 'astro';
import { TEAM_COOKIE } from './consts';
import { fail } from './lib/result';
import type { Identity } from './lib/server/access';
import { getDatabase } from './lib/server/database';
import { respond } from './lib/server/http';
import { bearerToken, identityForToken, identityForUser } from './lib/server/identity';
import { needsSignIn, signInLocation } from './lib/server/page-access';
import { publicOrigin, publicUrl } from './lib/server/public-origin';
import { isSameOriginWrite, withSecurityHeaders } from './lib/server/request-guard';
import { readSessionCookie } from './lib/server/session-cookie';
import { warmUpSheetPage } from './lib/server/warm-up-sheet-page';

let staleSessionReported = false;

// The built app loads this module at its first request (in practice the health check): from then on, between
// requests, it runs the sheet page's code on a built-in sheet so that nobody's first sheet waits for it to compile.
if (import.meta.env.PROD) {
  setTimeout(() => warmUpSheetPage().catch((error: Error) => console.warn(`The sheet page's warm-up failed: ${error.message}`)), 0);
}

/** Resolves the session cookie to an identity; a cookie signed with an old secret counts as signed out. */
async function sessionIdentity(request: Request): Promise<Identity | null> {
  try {
    const claims = await readSessionCookie(request, publicUrl(request.url));
    return claims ? await identityForUser(await getDatabase(), claims.userId, claims.signedInAt, claims.sessionId) : null;
  } catch (error) {
    if (!staleSessionReported) {
      staleSessionReported = true;
      console.warn(`Ignoring an unreadable session cookie (was AUTH_SECRET changed?): ${(error as Error).message}`);
    }
    return null;
  }
}

/**
 * The app's one origin check (Astro's own is off in astro.config.mjs because it also refused
 * token-carrying scripts): requests with a bearer token carry no cookie and pass; browser writes
 * must come from the public origin. Signed-in pages send anyone else to sign in, here once rather
 * than in each page.
 */
async function resolveIdentity(context: APIContext, next: MiddlewareNext, origin: string): Promise<Response> {
  context.locals.identity = null;
  context.locals.team = null;
  const token = bearerToken(context.request);
  const identity = token ? await identityForToken(await getDatabase(), token) : await sessionIdentity(context.request);
  if (token && !identity) return respond(fail({ kind: 'unauthenticated', message: 'The API token is unknown, revoked or no longer valid for its team.' }));
  if (!token && !isSameOriginWrite(context.request, origin)) return respond(fail({ kind: 'forbidden', message: 'Cross-site request refused.' }));

  const chosen = context.cookies.get(TEAM_COOKIE)?.value;
  context.locals.identity = identity;
  context.locals.team = identity?.memberships.find((m) => m.slug === chosen) ?? identity?.memberships[0] ?? null;
  if (!identity && needsSignIn(context.routePattern)) return context.redirect(signInLocation(context.url));
  return next();
}

export const onRequest = defineMiddleware(async (context, next) => {
  // The route pattern names the request in the edge's log line and metrics (src/lib/server/observability.ts).
  context.locals.route = context.routePattern;
  const origin = publicOrigin(context.url);
  const response = await resolveIdentity(context, next, origin);
  return withSecurityHeaders(response, { https: origin.startsWith('https:'), signedIn: context.locals.identity !== null });
});
