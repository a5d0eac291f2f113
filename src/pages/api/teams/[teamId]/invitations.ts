import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { createInvitation, listPendingInvitations } from '../../../../lib/server/invitations';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { createInvitationSchema } from '../../../../lib/validation/invitations';
import { publicOrigin } from '../../../../lib/server/public-origin';

export const GET = (async ({ locals, params }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return access.response;
  return Response.json({ invitations: await listPendingInvitations(await getDatabase(), teamId) });
}) satisfies APIRoute;

export const POST = (async ({ locals, params, request, url, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, createInvitationSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const created = await createInvitation(await getDatabase(), {
    teamId,
    inviter: access.identity.user,
    email: body.data.email,
    role: body.data.role,
    origin: publicOrigin(url),
    address: clientAddress,
  });
  if (!created.ok) return errorResponse(created.status, created.message, created.path);
  return Response.json({ invitation: created.value }, { status: 201 });
}) satisfies APIRoute;
