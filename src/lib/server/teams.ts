import { eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { teams } from '../../db/schema';

/** Renames a team. */
export async function renameTeam(database: Database, teamId: string, name: string): Promise<void> {
  await database.write((db) => db.update(teams).set({ name }).where(eq(teams.id, teamId)));
}

/** Deletes a team with its memberships, sheets, revisions, invitations and tokens (foreign keys cascade). */
export async function deleteTeam(database: Database, teamId: string): Promise<void> {
  await database.write((db) => db.delete(teams).where(eq(teams.id, teamId)));
}
