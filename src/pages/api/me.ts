import type { APIRoute } from 'astro';
import { requireIdentity } from '../../lib/server/access';

export const GET = (async ({ locals }) => {
  const access = requireIdentity(locals.identity);
  if (!access.ok) return access.response;
  const { user, via, memberships } = access.identity;
  return Response.json({ user, via, currentTeam: locals.team?.teamId ?? null, teams: memberships });
}) satisfies APIRoute;
