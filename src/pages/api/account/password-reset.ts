import type { APIRoute } from 'astro';
import { getDatabase } from '../../../lib/server/database';
import { respond } from '../../../lib/server/http';
import { requestPasswordReset } from '../../../lib/server/password-reset';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { PASSWORD_RESET_ANSWER, passwordResetRequestSchema } from '../../../lib/validation/password-reset';
import { publicOrigin } from '../../../lib/server/public-origin';
import { succeed } from '../../../lib/result';

/**
 * Answers at once and the same way for every address; the lookup and the mail run afterwards,
 * so neither the answer nor its timing tells whether an account exists.
 */
export const POST = (async ({ request, url, clientAddress }) => {
  const body = await parseJsonBody(request, passwordResetRequestSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const database = await getDatabase();
  requestPasswordReset(database, { email: body.value.email, origin: publicOrigin(url), address: clientAddress }).catch((error: Error) =>
    console.error(`Password reset mail failed: ${error.message}`),
  );
  return respond(succeed({ message: PASSWORD_RESET_ANSWER }), 202);
}) satisfies APIRoute;
