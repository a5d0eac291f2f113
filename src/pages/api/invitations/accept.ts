import type { APIRoute } from 'astro';
import { getDatabase } from '../../../lib/server/database';
import { respond } from '../../../lib/server/http';
import { acceptInvitation } from '../../../lib/server/invitations';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { acceptInvitationSchema } from '../../../lib/validation/invitations';

/** Open to anyone holding the link: the single-use token mailed to the invited address is the proof. */
export const POST = (async ({ request, clientAddress }) => {
  const body = await parseJsonBody(request, acceptInvitationSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const accepted = await acceptInvitation(await getDatabase(), { ...body.value, address: clientAddress });
  if (!accepted.ok) return respond(accepted);
  const { email, teamId, role, createdAccount } = accepted.value;
  return Response.json({ email, teamId, role, createdAccount });
}) satisfies APIRoute;
