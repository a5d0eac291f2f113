import type { APIRoute } from 'astro';
import { getDatabase } from '../../../../lib/server/database';
import { respond } from '../../../../lib/server/http';
import { confirmPasswordReset } from '../../../../lib/server/password-reset';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { passwordResetConfirmSchema } from '../../../../lib/validation/password-reset';

export const POST = (async ({ request, clientAddress }) => {
  const body = await parseJsonBody(request, passwordResetConfirmSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const reset = await confirmPasswordReset(await getDatabase(), { ...body.value, address: clientAddress });
  if (!reset.ok) return respond(reset);
  return Response.json({ email: reset.value.email });
}) satisfies APIRoute;
