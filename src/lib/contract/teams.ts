/** A team's members, pending invitations and API tokens, as the team and account pages list them. */
import type { Role } from '../roles';

/** GET /api/teams/:id/members lists these as `members`. */
export interface Member {
  userId: string;
  name: string | null;
  email: string | null;
  role: Role;
  joinedAt: Date;
}

/** GET /api/teams/:id/invitations lists these as `invitations`. */
export interface PendingInvitation {
  id: string;
  email: string;
  role: Role;
  expiresAt: Date;
  createdAt: Date;
  invitedBy: { id: string; name: string | null; email: string | null } | null;
}

/** What a token looks like to its holder: everything but the secret, which is never stored. GET /api/tokens lists these as `tokens`. */
export interface ApiTokenSummary {
  id: string;
  name: string;
  teamId: string;
  teamName: string;
  role: Role;
  userId: string;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

/** A token with its holder, for the owner's overview (GET /api/teams/:id/tokens lists these as `tokens`). */
export interface TeamApiToken extends ApiTokenSummary {
  holderEmail: string | null;
  holderName: string | null;
}

/** POST /api/tokens (201): the secret, shown this once, and the token's summary. */
export interface CreatedApiToken {
  token: string;
  summary: ApiTokenSummary;
}

/** A team the signed-in user may make tokens for, with the roles such a token may have. */
export interface TokenTeam {
  teamId: string;
  name: string;
  role: Role;
  /** Roles a token for this team may have: the holder's own and any with fewer rights. */
  tokenRoles: Role[];
}
