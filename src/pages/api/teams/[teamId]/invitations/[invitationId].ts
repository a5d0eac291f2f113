import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../../lib/server/access';
import { getDatabase } from '../../../../../lib/server/database';
import { revokeInvitation } from '../../../../../lib/server/invitations';

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return access.response;
  const revoked = await revokeInvitation(await getDatabase(), {
    teamId,
    invitationId: params.invitationId ?? '',
    actorId: access.identity.user.id,
    address: clientAddress,
  });
  if (!revoked.ok) return errorResponse(revoked.status, revoked.message);
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
