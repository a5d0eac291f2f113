import { z } from './zod';
import type { Role } from '../roles';
import { emailField, newPasswordField } from './auth';
import { roleField } from './team';

/** What each role may do, in plain words; typed by Role so a new role cannot be left out. */
export const ROLE_SUMMARIES: Record<Role, string> = {
  owner: 'everything, including inviting people and setting roles',
  editor: 'create, edit and fork sheets, and comment',
  reviewer: 'read and remark, sign revisions as checked or return them, upload controller logs',
  viewer: 'read sheets',
};

export const createInvitationSchema = z.object({
  email: emailField,
  role: roleField,
});

export const personNameField = z.string().trim().min(1, 'Enter your name.').max(100, 'Use at most 100 characters.');

export const acceptInvitationSchema = z.object({
  token: z.string().min(1, 'The invitation link is incomplete.').max(200, 'The invitation link is not valid.'),
  name: personNameField.optional(),
  password: newPasswordField.optional(),
});

/** What the accept form sends when the invited address has no account yet. */
export const newAccountSchema = z.object({ name: personNameField, password: newPasswordField });
