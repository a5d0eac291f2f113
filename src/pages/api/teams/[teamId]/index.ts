import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { getDatabase } from '../../../../lib/server/database';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { deleteTeam, renameTeam } from '../../../../lib/server/teams';
import { deleteTeamBody, renameTeamBody } from '../../../../lib/validation/teams';

export const PATCH = (async ({ params, request, locals, clientAddress }) => {
  const access = requirePermission(locals.identity, params.teamId ?? '', 'team.manage');
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, renameTeamBody, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const database = await getDatabase();
  await renameTeam(database, access.membership.teamId, body.data.name);
  await recordAudit(database, { teamId: access.membership.teamId, actorId: access.identity.user.id, action: 'team.rename', detail: { from: access.membership.name, to: body.data.name }, address: clientAddress });
  return Response.json({ teamId: access.membership.teamId, name: body.data.name });
}) satisfies APIRoute;

export const DELETE = (async ({ params, request, locals }) => {
  const access = requirePermission(locals.identity, params.teamId ?? '', 'team.manage');
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, deleteTeamBody, BODY_LIMITS.form);
  if (!body.ok && body.response.status === 413) return body.response;
  if (!body.ok || body.data.confirm !== access.membership.slug) {
    return errorResponse(400, `Type the team's short name (${access.membership.slug}) to confirm.`, 'confirm');
  }
  await deleteTeam(await getDatabase(), access.membership.teamId);
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
