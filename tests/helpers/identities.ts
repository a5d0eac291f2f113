import type { APIContext } from 'astro';
import type { Role } from '../../src/lib/roles';
import { memberships, teams, users } from '../../src/db/schema';
import type { Identity } from '../../src/lib/server/access';
import { getDatabase } from '../../src/lib/server/database';
import { identityForUser } from '../../src/lib/server/identity';

/** A new team with one user in each role, in the run's test database. */
export async function createTeamWithRoles(label: string): Promise<{ teamId: string; identities: Record<Role, Identity> }> {
  const database = await getDatabase();
  const suffix = `${label}-${Math.random().toString(36).slice(2, 8)}`;
  const [team] = await database.write((db) => db.insert(teams).values({ slug: suffix, name: `Team ${suffix}` }).returning());
  const roles: Role[] = ['owner', 'editor', 'reviewer', 'viewer'];
  const identities = {} as Record<Role, Identity>;
  for (const role of roles) {
    const [user] = await database.write((db) => db.insert(users).values({ email: `${role}-${suffix}@test.example`, name: `${role} ${suffix}` }).returning());
    await database.write((db) => db.insert(memberships).values({ teamId: team.id, userId: user.id, role }));
    identities[role] = (await identityForUser(database, user.id, Date.now()))!;
  }
  return { teamId: team.id, identities };
}

/** A minimal Astro API context for calling a route module directly. */
export function apiContext(options: {
  method?: string;
  url?: string;
  params?: Record<string, string>;
  body?: unknown;
  identity?: Identity | null;
}): APIContext {
  const url = new URL(options.url ?? 'http://127.0.0.1/api/test');
  const request = new Request(url, {
    method: options.method ?? 'GET',
    headers: options.body === undefined ? {} : { 'content-type': 'application/json' },
    body: options.body === undefined ? undefined : JSON.stringify(options.body),
  });
  const identity = options.identity ?? null;
  const cookieJar = new Map<string, string>();
  return {
    request,
    url,
    params: options.params ?? {},
    clientAddress: '127.0.0.1',
    locals: { identity, team: identity?.memberships[0] ?? null },
    cookies: {
      get: (name: string) => (cookieJar.has(name) ? { value: cookieJar.get(name)! } : undefined),
      set: (name: string, value: string) => void cookieJar.set(name, value),
      delete: (name: string) => void cookieJar.delete(name),
      has: (name: string) => cookieJar.has(name),
    },
  } as unknown as APIContext;
}
