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

/** A JSON error body with a message and, for input errors, the field path. */
export function errorResponse(status: number, message: string, path?: string): Response {
  return Response.json({ error: { message, ...(path ? { path } : {}) } }, { status });
}

export type Access = { ok: true; identity: Identity; membership: TeamMembership } | { ok: false; response: Response };

/**
 * The one access check for routes and pages: 401 without an identity, 404 when the team is
 * not one of the identity's (so other teams' objects do not reveal that they exist), 403
 * when the role does not grant the permission.
 */
export function requirePermission(identity: Identity | null, teamId: string, permission: Permission): Access {
  if (!identity) return { ok: false, response: errorResponse(401, 'Sign in first.') };
  const membership = identity.memberships.find((m) => m.teamId === teamId);
  if (!membership) return { ok: false, response: errorResponse(404, 'Not found.') };
  if (!can(membership.role, permission)) {
    return { ok: false, response: errorResponse(403, `Your role (${membership.role}) does not allow this.`) };
  }
  return { ok: true, identity, membership };
}

/** 401 unless someone is signed in (by session or token). */
export function requireIdentity(identity: Identity | null): { ok: true; identity: Identity } | { ok: false; response: Response } {
  return identity ? { ok: true, identity } : { ok: false, response: errorResponse(401, 'Sign in first.') };
}

/** 401 unless signed in, 403 for API tokens: for account and token management, which a leaked token must not reach. */
export function requireSession(identity: Identity | null): { ok: true; identity: Identity } | { ok: false; response: Response } {
  if (!identity) return { ok: false, response: errorResponse(401, 'Sign in first.') };
  if (identity.via !== 'session') return { ok: false, response: errorResponse(403, 'This needs a signed-in browser session; API tokens cannot do it.') };
  return { ok: true, identity };
}
