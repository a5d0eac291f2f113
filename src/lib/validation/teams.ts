import { z } from './zod';

export const renameTeamBody = z.object({
  name: z.string().trim().min(2, 'Give the team a name of at least 2 characters.').max(80, 'Keep the team name under 80 characters.'),
});

/** Deleting a team needs its slug typed out, so a stray click cannot do it. */
export const deleteTeamBody = z.object({ confirm: z.string() });
