import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { respond } from '../../../../lib/server/http';
import { listMembers } from '../../../../lib/server/members';

export const GET = (async ({ locals, params }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'sheet.read');
  if (!access.ok) return respond(access);
  return Response.json({ members: await listMembers(await getDatabase(), teamId) });
}) satisfies APIRoute;
