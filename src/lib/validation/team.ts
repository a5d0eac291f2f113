import { z } from './zod';
import { ROLES } from '../roles';

export const roleField = z.enum(ROLES, 'Choose one of: owner, editor, reviewer, viewer.');

export const teamIdField = z.string().trim().min(1, 'Choose a team.').max(100, 'That team id is too long.');

export const createTokenSchema = z.object({
  teamId: teamIdField,
  name: z.string().trim().min(1, 'Name the token, e.g. "CI log upload".').max(80, 'Use at most 80 characters.'),
  role: roleField,
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;

export const changeRoleSchema = z.object({ role: roleField });

export const switchTeamSchema = z.object({ teamId: teamIdField });
