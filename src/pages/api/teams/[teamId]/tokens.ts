import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../lib/server/access';
import { listTeamApiTokens } from '../../../../lib/server/api-tokens';
import { getDatabase } from '../../../../lib/server/database';
import { respond } from '../../../../lib/server/http';

/** Every member's tokens for this team, so the owner can see what can reach it and revoke what should not. */
export const GET = (async ({ locals, params }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  return Response.json({ tokens: await listTeamApiTokens(await getDatabase(), teamId) });
}) satisfies APIRoute;
