import type { APIRoute } from 'astro';
import { errorResponse, requireSession } from '../../lib/server/access';
import { createApiToken, listApiTokens } from '../../lib/server/api-tokens';
import { getDatabase } from '../../lib/server/database';
import { BODY_LIMITS, parseJsonBody } from '../../lib/server/request-body';
import { createTokenSchema } from '../../lib/validation/team';

export const GET = (async ({ locals }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return access.response;
  return Response.json({ tokens: await listApiTokens(await getDatabase(), access.identity.user.id) });
}) satisfies APIRoute;

export const POST = (async ({ locals, request, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, createTokenSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const created = await createApiToken(await getDatabase(), access.identity, body.data, clientAddress);
  if (!created.ok) return errorResponse(created.status, created.message, created.status === 403 ? 'role' : undefined);
  return Response.json(created.value, { status: 201, headers: { 'cache-control': 'no-store' } });
}) satisfies APIRoute;
