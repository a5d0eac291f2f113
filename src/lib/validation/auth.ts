import { z } from './zod';

export const emailField = z.string().trim().toLowerCase().pipe(z.email('Enter an e-mail address like name@example.com.'));

export const passwordSignInSchema = z.object({
  email: emailField,
  password: z.string().min(1, 'Enter your password.').max(200, 'That password is too long.'),
});

export const emailLinkSchema = z.object({ email: emailField });

/** Rules for a new password (NIST SP 800-63B: length over composition rules). */
export const newPasswordField = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');
