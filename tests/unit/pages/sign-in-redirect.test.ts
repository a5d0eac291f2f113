import { readdirSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createApiToken } from '../../../src/lib/server/api-tokens';
import { getDatabase } from '../../../src/lib/server/database';
import { needsSignIn, PUBLIC_PAGES, SIGNED_IN_PAGES, signedInIdentity } from '../../../src/lib/server/page-access';
import { callThroughMiddleware, demoIdentity, demoTeamId } from '../../helpers/api-context';

const PAGES_DIR = join(process.cwd(), 'src', 'pages');

/** Every .astro page's route pattern, as Astro derives it from the file's place under src/pages. */
function pageRoutes(dir = PAGES_DIR): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return pageRoutes(path);
    if (!entry.name.endsWith('.astro')) return [];
    const route = `/${relative(PAGES_DIR, path).split(sep).join('/')}`.replace(/\.astro$/, '').replace(/\/?index$/, '');
    return [route || '/'];
  });
}

/** A path that matches the route, with a query so the test sees it kept. */
function pathFor(route: string): string {
  return `${route.replace('[sheetId]', 'a-sheet-id').replace('[token]', 'a-token')}?revision=2&tab=a%20b`;
}

const page = () => new Response('the page', { status: 200 });

describe('which pages need a signed-in caller', () => {
  it('puts every page in exactly one of the two lists, and lists no page that does not exist', () => {
    const routes = pageRoutes().sort();
    expect(routes.filter((route) => SIGNED_IN_PAGES.has(route) === PUBLIC_PAGES.has(route))).toEqual([]);
    expect([...SIGNED_IN_PAGES, ...PUBLIC_PAGES].sort()).toEqual(routes);
  });
});

describe('the middleware in front of pages', () => {
  it.each([...SIGNED_IN_PAGES])('sends an anonymous GET of %s to sign in, coming back to the same path and query, with the security headers', async (route) => {
    const path = pathFor(route);
    const response = await callThroughMiddleware(page, { path, routePattern: route });
    expect(response.status).toBe(302);
    expect(response.headers.get('location')).toBe(`/sign-in?callbackUrl=${encodeURIComponent(path)}`);
    expect(response.headers.get('x-content-type-options')).toBe('nosniff');
    expect(response.headers.get('x-frame-options')).toBe('DENY');
  });

  it('matches the route as the built app spells it, in lower case', async () => {
    const path = pathFor('/sheets/[sheetId]/report');
    const response = await callThroughMiddleware(page, { path, routePattern: '/sheets/[sheetid]/report' });
    expect(response.status).toBe(302);
    expect(response.headers.get('location')).toBe(`/sign-in?callbackUrl=${encodeURIComponent(path)}`);
    expect(needsSignIn('/sheets/[sheetid]/history')).toBe(true);
    expect(needsSignIn('/invite/[token]')).toBe(false);
  });

  it.each([...PUBLIC_PAGES])('renders %s for an anonymous caller', async (route) => {
    const response = await callThroughMiddleware(page, { path: pathFor(route), routePattern: route });
    expect(response.status).toBe(200);
    expect(await response.text()).toBe('the page');
  });

  it('leaves API routes to answer 401 themselves', async () => {
    const api = () => new Response(null, { status: 401 });
    expect((await callThroughMiddleware(api, { path: '/api/sheets', routePattern: '/api/sheets' })).status).toBe(401);
  });

  it('renders a signed-in page for a caller with an identity', async () => {
    const created = await createApiToken(await getDatabase(), await demoIdentity('viewer'), { teamId: await demoTeamId(), name: 'page test', role: 'viewer' });
    if (!created.ok) throw new Error(created.error.message);
    const response = await callThroughMiddleware(page, { path: '/sheets', routePattern: '/sheets', headers: { authorization: `Bearer ${created.value.token}` } });
    expect(response.status).toBe(200);
  });
});

describe('signedInIdentity', () => {
  it('hands a signed-in page its identity, and fails loudly when a page reaches it without one', async () => {
    const identity = await demoIdentity('viewer');
    expect(signedInIdentity({ identity, team: identity.memberships[0] })).toBe(identity);
    expect(() => signedInIdentity({ identity: null, team: null })).toThrow(/SIGNED_IN_PAGES/);
  });
});
