import type { Database } from '../../db';
import type { Permission } from '../roles';
import { requirePermission, type Access, type Identity, type TeamMembership } from './access';
import { getDatabase } from './database';
import { findSheet } from './sheets';

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
 * Pages anyone may open: the home page, signing in and out, the pages behind links mailed to
 * people who have no session yet, and the worked examples (read like product documentation).
 * Every page is in exactly one of the two lists (a unit test reads src/pages), so a new page
 * cannot end up public by being forgotten.
 */
export const PUBLIC_PAGES: ReadonlySet<string> = new Set([
  '/',
  '/sign-in',
  '/sign-in/check-email',
  '/sign-out',
  '/invite/[token]',
  '/reset-password',
  '/reset-password/[token]',
  '/examples',
  '/examples/[slug]',
  // The reference reads like product documentation: anyone may read it before signing up.
  '/docs',
  '/docs/[slug]',
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

type SheetRow = NonNullable<Awaited<ReturnType<typeof findSheet>>>;

/** What a sheet page works with: the caller, the database, and the sheet with the caller's membership when they may read it. */
export interface SheetPageAccess {
  identity: Identity;
  database: Database;
  /** Null for a missing sheet and for another team's, which the page answers alike (404). */
  sheet: SheetRow | null;
  membership: TeamMembership | null;
}

/** The sheet `sheetId` when `identity` may read it (`sheet.read`), else null: a missing sheet and another team's look the same. */
export async function findReadableSheet(database: Database, identity: Identity, sheetId: string): Promise<SheetRow | null> {
  const sheet = await findSheet(database, sheetId);
  return sheet && requirePermission(identity, sheet.teamId, 'sheet.read').ok ? sheet : null;
}

/** The one access check of the pages under /sheets/{id}: the signed-in caller and the sheet they may read, or no sheet. */
export async function openSheetPage(locals: App.Locals, sheetId: string | undefined): Promise<SheetPageAccess> {
  const identity = signedInIdentity(locals);
  const database = await getDatabase();
  const sheet = await findReadableSheet(database, identity, sheetId ?? '');
  const membership = sheet ? (identity.memberships.find((m) => m.teamId === sheet.teamId) ?? null) : null;
  return { identity, database, sheet, membership };
}

/** The one access check of the pages about the caller's current team: the caller, the team (null outside any team) and whether `permission` is granted there. */
export function openTeamPage(locals: App.Locals, permission: Permission): { identity: Identity; team: TeamMembership | null; access: Access } {
  const identity = signedInIdentity(locals);
  const { team } = locals;
  return { identity, team, access: requirePermission(identity, team?.teamId ?? '', permission) };
}
