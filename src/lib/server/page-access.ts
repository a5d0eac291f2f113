import type { Identity } from './access';

/**
 * Pages only signed-in people see, as Astro names their routes: the middleware sends anyone else
 * to sign in and back. API routes are not listed: they answer 401 themselves.
 */
export const SIGNED_IN_PAGES: ReadonlySet<string> = new Set([
  '/account',
  '/account/tokens',
  '/sheets',
  '/sheets/new',
  '/sheets/[sheetId]',
  '/sheets/[sheetId]/compare',
  '/sheets/[sheetId]/history',
  '/sheets/[sheetId]/report',
  '/team/audit',
  '/team/members',
]);

const SIGNED_IN_ROUTES: ReadonlySet<string> = new Set([...SIGNED_IN_PAGES].map((route) => route.toLowerCase()));

/** Whether a route needs a signed-in caller; the built app spells route patterns in lower case (`[sheetid]`). */
export function needsSignIn(routePattern: string): boolean {
  return SIGNED_IN_ROUTES.has(routePattern.toLowerCase());
}

/**
 * Pages anyone may open: the home page, signing in and out, and the pages behind links mailed to
 * people who have no session yet. Every page is in exactly one of the two lists (a unit test reads
 * src/pages), so a new page cannot end up public by being forgotten.
 */
export const PUBLIC_PAGES: ReadonlySet<string> = new Set([
  '/',
  '/sign-in',
  '/sign-in/check-email',
  '/sign-out',
  '/invite/[token]',
  '/reset-password',
  '/reset-password/[token]',
]);

/** Where a signed-out visitor of `url` signs in; afterwards the sign-in page sends them back to the same path and query. */
export function signInLocation(url: URL): string {
  return `/sign-in?callbackUrl=${encodeURIComponent(url.pathname + url.search)}`;
}

/** The identity on a page in SIGNED_IN_PAGES, which the middleware renders only for a signed-in caller. */
export function signedInIdentity(locals: App.Locals): Identity {
  if (!locals.identity) throw new Error('A signed-in page was rendered without an identity; is it listed in SIGNED_IN_PAGES?');
  return locals.identity;
}
