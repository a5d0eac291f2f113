import type { APIRoute } from 'astro';
import { getDatabase } from '../../../lib/server/database';
import { requestPasswordReset } from '../../../lib/server/password-reset';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { PASSWORD_RESET_ANSWER, passwordResetRequestSchema } from '../../../lib/validation/password-reset';
import { publicOrigin } from '../../../lib/server/public-origin';

/**
 * Answers at once and the same way for every address; the lookup and the mail run afterwards,
 * so neither the answer nor its timing tells whether an account exists.
 */
export const POST = (async ({ request, url, clientAddress }) => {
  const body = await parseJsonBody(request, passwordResetRequestSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const database = await getDatabase();
  requestPasswordReset(database, { email: body.data.email, origin: publicOrigin(url), address: clientAddress }).catch((error: Error) =>
    console.error(`Password reset mail failed: ${error.message}`),
  );
  return Response.json({ message: PASSWORD_RESET_ANSWER }, { status: 202 });
}) satisfies APIRoute;
