import type { APIRoute } from 'astro';
import { requireSession } from '../../lib/server/access';
import { createApiToken, listApiTokens } from '../../lib/server/api-tokens';
import { getDatabase } from '../../lib/server/database';
import { respond } from '../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../lib/server/request-body';
import { createTokenSchema } from '../../lib/validation/team';

export const GET = (async ({ locals }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return respond(access);
  return Response.json({ tokens: await listApiTokens(await getDatabase(), access.value.user.id) });
}) satisfies APIRoute;

export const POST = (async ({ locals, request, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, createTokenSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const created = await createApiToken(await getDatabase(), access.value, body.value, clientAddress);
  return respond(created, 201, { 'cache-control': 'no-store' });
}) satisfies APIRoute;
