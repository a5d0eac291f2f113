import { z } from './zod';
import { newPasswordField } from './auth';

export const changePasswordSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password.').max(200, 'That password is too long.'),
    newPassword: newPasswordField,
  })
  .refine((v) => v.newPassword !== v.currentPassword, { path: ['newPassword'], message: 'Choose a password different from the current one.' });
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;
