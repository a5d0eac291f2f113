import type { APIRoute } from 'astro';
import { errorResponse, requireSession } from '../../../lib/server/access';
import { revokeApiToken } from '../../../lib/server/api-tokens';
import { getDatabase } from '../../../lib/server/database';

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return access.response;
  const revoked = await revokeApiToken(await getDatabase(), access.identity, params.tokenId ?? '', clientAddress);
  if (!revoked.ok) return errorResponse(revoked.status, revoked.message);
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
