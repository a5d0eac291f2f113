import { fail, type Failure, type Result } from '../result';
import { can, type Permission, type Role } from '../roles';

export interface TeamMembership {
  teamId: string;
  slug: string;
  name: string;
  role: Role;
}

export interface Identity {
  user: { id: string; email: string; name: string | null };
  via: 'session' | 'token';
  /** Teams this identity may act in; a token sees only its own team, at its own role. */
  memberships: TeamMembership[];
  tokenId?: string;
}

/** The failure for a caller who is not signed in. */
export const signInFirst = (): Failure => fail({ kind: 'unauthenticated', message: 'Sign in first.' });

/** The failure for something that does not exist or is another team's (the two answer alike), naming the field if any. */
export const notFound = (message = 'Not found.', path?: string): Failure => fail({ kind: 'not-found', message, ...(path ? { path } : {}) });

export type Access = Result<{ identity: Identity; membership: TeamMembership }>;

/**
 * The one access check for routes and pages: unauthenticated without an identity, not-found
 * when the team is not one of the identity's (so other teams' objects do not reveal that they
 * exist), forbidden when the role does not grant the permission.
 */
export function requirePermission(identity: Identity | null, teamId: string, permission: Permission): Access {
  if (!identity) return signInFirst();
  const membership = identity.memberships.find((m) => m.teamId === teamId);
  if (!membership) return notFound();
  if (!can(membership.role, permission)) return fail({ kind: 'forbidden', message: `Your role (${membership.role}) does not allow ${permission}.` });
  return { ok: true, value: { identity, membership } };
}

/** Unauthenticated unless someone is signed in (by session or token). */
export function requireIdentity(identity: Identity | null): Result<Identity> {
  return identity ? { ok: true, value: identity } : signInFirst();
}

/** Unauthenticated unless signed in, forbidden for API tokens: for account and token management, which a leaked token must not reach. */
export function requireSession(identity: Identity | null): Result<Identity> {
  if (!identity) return signInFirst();
  if (identity.via !== 'session') return fail({ kind: 'forbidden', message: 'This needs a signed-in browser session; API tokens cannot do it.' });
  return { ok: true, value: identity };
}
