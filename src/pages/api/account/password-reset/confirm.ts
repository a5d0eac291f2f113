import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { confirmPasswordReset } from '../../../../lib/server/password-reset';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { passwordResetConfirmSchema } from '../../../../lib/validation/password-reset';

export const POST = (async ({ request, clientAddress }) => {
  const body = await parseJsonBody(request, passwordResetConfirmSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const reset = await confirmPasswordReset(await getDatabase(), { ...body.data, address: clientAddress });
  if (!reset.ok) return errorResponse(reset.status, reset.message, 'token');
  return Response.json({ email: reset.value.email });
}) satisfies APIRoute;
