import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { respond } from '../../../../lib/server/http';
import { createInvitation, listPendingInvitations } from '../../../../lib/server/invitations';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { createInvitationSchema } from '../../../../lib/validation/invitations';
import { publicOrigin } from '../../../../lib/server/public-origin';

export const GET = (async ({ locals, params }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  return Response.json({ invitations: await listPendingInvitations(await getDatabase(), teamId) });
}) satisfies APIRoute;

export const POST = (async ({ locals, params, request, url, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, createInvitationSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const created = await createInvitation(await getDatabase(), {
    teamId,
    inviter: access.value.identity.user,
    email: body.value.email,
    role: body.value.role,
    origin: publicOrigin(url),
    address: clientAddress,
  });
  if (!created.ok) return respond(created);
  return Response.json({ invitation: created.value }, { status: 201 });
}) satisfies APIRoute;
