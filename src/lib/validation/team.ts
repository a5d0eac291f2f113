import { z } from './zod';
import type { Role } from '../../db/schema';

/** Roles from most to least rights; typed by Role so the list stays in step with the schema without importing it into the browser. */
export const ROLE_CHOICES = ['owner', 'editor', 'reviewer', 'viewer'] as const satisfies readonly Role[];

export const roleField = z.enum(ROLE_CHOICES, 'Choose one of: owner, editor, reviewer, viewer.');

export const teamIdField = z.string().trim().min(1, 'Choose a team.').max(100, 'That team id is too long.');

export const createTokenSchema = z.object({
  teamId: teamIdField,
  name: z.string().trim().min(1, 'Name the token, e.g. "CI log upload".').max(80, 'Use at most 80 characters.'),
  role: roleField,
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;

export const changeRoleSchema = z.object({ role: roleField });

export const switchTeamSchema = z.object({ teamId: teamIdField });
