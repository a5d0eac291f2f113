import type { APIRoute } from 'astro';
import { requireSession } from '../../../lib/server/access';
import { revokeApiToken } from '../../../lib/server/api-tokens';
import { getDatabase } from '../../../lib/server/database';
import { noContent, respond } from '../../../lib/server/http';

export const DELETE = (async ({ locals, params, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return respond(access);
  const revoked = await revokeApiToken(await getDatabase(), access.value, params.tokenId ?? '', clientAddress);
  return revoked.ok ? noContent() : respond(revoked);
}) satisfies APIRoute;
