import { z } from './zod';
import { emailField, newPasswordField } from './auth';

export const passwordResetRequestSchema = z.object({ email: emailField });

export const passwordResetConfirmSchema = z.object({
  token: z.string().min(1, 'The reset link is incomplete.').max(200, 'The reset link is not valid.'),
  password: newPasswordField,
});

/** The one answer to every reset request, whether or not an account uses the address. */
export const PASSWORD_RESET_ANSWER =
  'If an account uses that address, we sent it a link to choose a new password. The link works once, for 1 hour.';
