import type { APIContext } from 'astro';
import { eq } from 'drizzle-orm';
import { memberships, teams, users } from '../../src/db/schema';
import type { Role } from '../../src/lib/roles';
import type { Identity } from '../../src/lib/server/access';
import { getDatabase } from '../../src/lib/server/database';
import { DEMO_TEAM, DEMO_USERS } from '../../src/lib/server/demo';
import { identityForUser } from '../../src/lib/server/identity';
import { hashPassword } from '../../src/lib/server/passwords';

export const ORIGIN = 'http://127.0.0.1:4321';

export type Handler = (context: APIContext) => Response | Promise<Response>;

/** A cookie jar with the parts of Astro's cookies API that routes and the middleware use. */
export function cookieJar(initial: Record<string, string> = {}) {
  const values = new Map(Object.entries(initial));
  const options = new Map<string, Record<string, unknown>>();
  return {
    values,
    options,
    get: (name: string) => (values.has(name) ? { value: values.get(name)! } : undefined),
    has: (name: string) => values.has(name),
    set: (name: string, value: string, opts: Record<string, unknown> = {}) => {
      values.set(name, value);
      options.set(name, opts);
    },
    delete: (name: string) => values.delete(name),
  };
}

export interface RequestSpec {
  method?: string;
  path: string;
  /** The route as Astro names it (`/sheets/[sheetId]`), which the middleware matches pages by. */
  routePattern?: string;
  params?: Record<string, string>;
  body?: unknown;
  headers?: Record<string, string>;
  identity?: Identity | null;
  cookies?: ReturnType<typeof cookieJar>;
}

/** The context Astro hands an API route, built by hand; `locals` carries the identity like the middleware would. */
export function apiContext(spec: RequestSpec): APIContext {
  const url = new URL(spec.path, ORIGIN);
  const method = spec.method ?? 'GET';
  const headers = new Headers(spec.headers);
  // Bytes and streams (file uploads) go as they are; anything else as JSON.
  const raw = spec.body instanceof Uint8Array || spec.body instanceof ReadableStream;
  if (spec.body !== undefined && !raw) headers.set('content-type', 'application/json');
  const body = spec.body === undefined ? undefined : raw ? (spec.body as BodyInit) : JSON.stringify(spec.body);
  const request = new Request(url, { method, headers, body, ...(spec.body instanceof ReadableStream ? { duplex: 'half' } : {}) } as RequestInit);
  const identity = spec.identity ?? null;
  return {
    request,
    url,
    params: spec.params ?? {},
    routePattern: spec.routePattern ?? url.pathname,
    cookies: spec.cookies ?? cookieJar(),
    clientAddress: '127.0.0.1',
    locals: { identity, team: identity?.memberships[0] ?? null },
    redirect: (location: string, status = 302) => new Response(null, { status, headers: { location } }),
  } as unknown as APIContext;
}

/** Calls a route handler with a hand-built context. */
export async function callRoute(handler: Handler, spec: RequestSpec): Promise<Response> {
  return handler(apiContext(spec));
}

/** The seeded demo team's id. */
export async function demoTeamId(): Promise<string> {
  const database = await getDatabase();
  const [team] = await database.db.select({ id: teams.id }).from(teams).where(eq(teams.slug, DEMO_TEAM.slug));
  return team.id;
}

/** The session identity of the demo user with `role` in the demo team. */
export async function demoIdentity(role: Role): Promise<Identity> {
  const database = await getDatabase();
  const email = DEMO_USERS.find((u) => u.role === role)!.email;
  const [user] = await database.db.select({ id: users.id }).from(users).where(eq(users.email, email));
  return (await identityForUser(database, user.id, Date.now()))!;
}

/** Adds a new user (password `password`) to a team at `role`; creates the team when `teamSlug` is new. */
export async function addTestMember(
  role: Role,
  { teamId, teamSlug, password = 'test-password-1' }: { teamId?: string; teamSlug?: string; password?: string } = {},
): Promise<{ userId: string; teamId: string; email: string }> {
  const database = await getDatabase();
  const suffix = crypto.randomUUID().slice(0, 8);
  const email = `member-${suffix}@slipless.example`;
  const passwordHash = await hashPassword(password);
  return database.transaction(async (tx) => {
    let team = teamId;
    if (!team) {
      const slug = teamSlug ?? `test-team-${suffix}`;
      [{ id: team }] = await tx.insert(teams).values({ slug, name: `Test team ${suffix}` }).returning({ id: teams.id });
    }
    const [user] = await tx.insert(users).values({ name: `Member ${suffix}`, email, passwordHash }).returning({ id: users.id });
    await tx.insert(memberships).values({ teamId: team, userId: user.id, role });
    return { userId: user.id, teamId: team, email };
  });
}

/**
 * Runs the request through the real middleware (bearer tokens, team cookie, same-origin check)
 * and then the handler, the way the server does.
 */
export async function callThroughMiddleware(handler: Handler, spec: Omit<RequestSpec, 'identity'>): Promise<Response> {
  const { onRequest } = await import('../../src/middleware');
  const context = apiContext(spec);
  context.locals.identity = null;
  context.locals.team = null;
  const response = await onRequest(context, async () => handler(context));
  if (!(response instanceof Response)) throw new Error('The middleware returned no response');
  return response;
}
