import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../../lib/server/access';
import { getDatabase } from '../../../../../lib/server/database';
import { noContent, respond } from '../../../../../lib/server/http';
import { changeRole, removeMember } from '../../../../../lib/server/members';
import { BODY_LIMITS, parseJsonBody } from '../../../../../lib/server/request-body';
import { changeRoleSchema } from '../../../../../lib/validation/team';

export const PATCH = (async ({ locals, params, request, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, changeRoleSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const changed = await changeRole(await getDatabase(), access.value.identity, teamId, params.userId ?? '', body.value.role, clientAddress);
  if (!changed.ok) return respond(changed);
  return Response.json({ member: changed.value });
}) satisfies APIRoute;

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  const removed = await removeMember(await getDatabase(), access.value.identity, teamId, params.userId ?? '', clientAddress);
  return removed.ok ? noContent() : respond(removed);
}) satisfies APIRoute;
