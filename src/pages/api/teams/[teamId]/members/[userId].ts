import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../../lib/server/access';
import { getDatabase } from '../../../../../lib/server/database';
import { changeRole, removeMember } from '../../../../../lib/server/members';
import { BODY_LIMITS, parseJsonBody } from '../../../../../lib/server/request-body';
import { changeRoleSchema } from '../../../../../lib/validation/team';

export const PATCH = (async ({ locals, params, request, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, changeRoleSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const changed = await changeRole(await getDatabase(), access.identity, teamId, params.userId ?? '', body.data.role, clientAddress);
  if (!changed.ok) return errorResponse(changed.status, changed.message, changed.status === 409 ? 'role' : undefined);
  return Response.json({ member: changed.value });
}) satisfies APIRoute;

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return access.response;
  const removed = await removeMember(await getDatabase(), access.identity, teamId, params.userId ?? '', clientAddress);
  if (!removed.ok) return errorResponse(removed.status, removed.message);
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
