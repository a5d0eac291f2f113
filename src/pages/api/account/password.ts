import type { APIRoute } from 'astro';
import { errorResponse, requireSession } from '../../../lib/server/access';
import { changePassword } from '../../../lib/server/account';
import { getDatabase } from '../../../lib/server/database';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { changePasswordSchema } from '../../../lib/validation/account';

export const POST = (async ({ locals, request, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, changePasswordSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const changed = await changePassword(await getDatabase(), access.identity, body.data, clientAddress);
  if (!changed.ok) return errorResponse(changed.status, changed.message, changed.path);
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
