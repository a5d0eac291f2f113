import type { APIRoute } from 'astro';
import { requireSession } from '../../../lib/server/access';
import { changePassword } from '../../../lib/server/account';
import { getDatabase } from '../../../lib/server/database';
import { noContent, respond } from '../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { changePasswordSchema } from '../../../lib/validation/account';

export const POST = (async ({ locals, request, clientAddress }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, changePasswordSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const changed = await changePassword(await getDatabase(), access.value, body.value, clientAddress);
  return changed.ok ? noContent() : respond(changed);
}) satisfies APIRoute;
