import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../../lib/server/access';
import { getDatabase } from '../../../../../lib/server/database';
import { noContent, respond } from '../../../../../lib/server/http';
import { revokeInvitation } from '../../../../../lib/server/invitations';

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const teamId = params.teamId ?? '';
  const access = requirePermission(locals.identity, teamId, 'team.manage');
  if (!access.ok) return respond(access);
  const revoked = await revokeInvitation(await getDatabase(), {
    teamId,
    invitationId: params.invitationId ?? '',
    actorId: access.value.identity.user.id,
    address: clientAddress,
  });
  return revoked.ok ? noContent() : respond(revoked);
}) satisfies APIRoute;
