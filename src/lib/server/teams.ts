import { eq } from 'drizzle-orm';
import type { Database } from '../../db';
import { teams } from '../../db/schema';
import { insertAudit } from './audit';
import type { Actor } from './sheets';

/** Renames a team and writes the audit event in the same transaction. */
export async function renameTeam(database: Database, team: { teamId: string; name: string }, name: string, actor: Actor): Promise<void> {
  await database.transaction(async (tx) => {
    await tx.update(teams).set({ name }).where(eq(teams.id, team.teamId));
    await insertAudit(tx, { teamId: team.teamId, actorId: actor.userId, action: 'team.rename', detail: { from: team.name, to: name }, address: actor.address });
  });
}

/** Deletes a team with its memberships, sheets, revisions, invitations and tokens (foreign keys cascade). */
export async function deleteTeam(database: Database, teamId: string): Promise<void> {
  await database.write((db) => db.delete(teams).where(eq(teams.id, teamId)));
}
