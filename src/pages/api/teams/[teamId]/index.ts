import type { APIRoute } from 'astro';
import { fail } from '../../../../lib/result';
import { requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { noContent, respond } from '../../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { deleteTeam, renameTeam } from '../../../../lib/server/teams';
import { deleteTeamBody, renameTeamBody } from '../../../../lib/validation/teams';

export const PATCH = (async ({ params, request, locals, clientAddress }) => {
  const access = requirePermission(locals.identity, params.teamId ?? '', 'team.manage');
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, renameTeamBody, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const { identity, membership } = access.value;
  await renameTeam(await getDatabase(), membership, body.value.name, { userId: identity.user.id, address: clientAddress });
  return Response.json({ teamId: membership.teamId, name: body.value.name });
}) satisfies APIRoute;

export const DELETE = (async ({ params, request, locals }) => {
  const access = requirePermission(locals.identity, params.teamId ?? '', 'team.manage');
  if (!access.ok) return respond(access);
  const { membership } = access.value;
  const body = await parseJsonBody(request, deleteTeamBody, BODY_LIMITS.form);
  if (!body.ok && body.error.kind === 'too-large') return respond(body);
  if (!body.ok || body.value.confirm !== membership.slug) {
    return respond(fail({ kind: 'invalid', message: `Type the team's short name (${membership.slug}) to confirm.`, path: 'confirm' }));
  }
  await deleteTeam(await getDatabase(), membership.teamId);
  return noContent();
}) satisfies APIRoute;
