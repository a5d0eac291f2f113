import type { APIRoute } from 'astro';
import { requireIdentity } from '../../lib/server/access';
import { respond } from '../../lib/server/http';

export const GET = (async ({ locals }) => {
  const access = requireIdentity(locals.identity);
  if (!access.ok) return respond(access);
  const { user, via, memberships } = access.value;
  return Response.json({ user, via, currentTeam: locals.team?.teamId ?? null, teams: memberships });
}) satisfies APIRoute;
