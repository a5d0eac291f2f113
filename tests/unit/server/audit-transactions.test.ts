import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { Database } from '../../../src/db';
import { auditEvents, comments, memberships, reviews, sheetRevisions, sheets, teams } from '../../../src/db/schema';
import { prepareDatabase } from '../../../src/lib/server/bootstrap';
import { addComment, submitReview } from '../../../src/lib/server/reviews';
import { deleteSheet, findSheet } from '../../../src/lib/server/sheets';
import { renameTeam } from '../../../src/lib/server/teams';
import { createTestSheet } from '../../helpers/test-sheets';
import { tempDatabaseUrl } from '../../helpers/temp';

// Each write and its audit event commit together: with audit inserts refused, the change must not land either.
let database: Database;
let teamId: string;
let userId: string;
let sheetId: string;

const refuseAudit = () => database.client.execute("CREATE TRIGGER IF NOT EXISTS refuse_audit BEFORE INSERT ON audit_events BEGIN SELECT RAISE(ABORT, 'audit refused'); END");
const events = (action: string) => database.db.select().from(auditEvents).where(and(eq(auditEvents.action, action), eq(auditEvents.teamId, teamId)));

beforeAll(async () => {
  ({ database } = await prepareDatabase(tempDatabaseUrl()));
  const [owner] = await database.db.select().from(memberships).where(eq(memberships.role, 'owner')).limit(1);
  ({ teamId, userId } = owner);
  ({ sheetId } = await createTestSheet(database, teamId, 'Audited together'));
});

beforeEach(() => database.client.execute('DROP TRIGGER IF EXISTS refuse_audit'));

afterAll(() => database.close());

describe('writes and their audit events commit together', () => {
  it('a review: no verdict and no changed review state without its event, both with it', async () => {
    const sheet = (await findSheet(database, sheetId))!;
    const input = { sheet, revision: 1, verdict: 'checked' as const, body: 'Checked.', actor: { userId } };
    await refuseAudit();
    await expect(submitReview(database, input)).rejects.toThrow();
    expect(await database.db.select().from(reviews).where(eq(reviews.sheetId, sheetId))).toEqual([]);
    const [revision] = await database.db.select().from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheetId));
    expect(revision.reviewState).toBe('draft');

    await database.client.execute('DROP TRIGGER refuse_audit');
    await submitReview(database, input);
    expect(await database.db.select().from(reviews).where(eq(reviews.sheetId, sheetId))).toHaveLength(1);
    expect(await events('sheet.check')).toMatchObject([{ subject: sheetId, actorId: userId, detail: { revision: 1 } }]);
  });

  it('a comment: none stored without its event, both with it', async () => {
    const sheet = (await findSheet(database, sheetId))!;
    const input = { sheet, revision: 1, body: 'Why this friction?', actor: { userId } };
    await refuseAudit();
    await expect(addComment(database, input)).rejects.toThrow();
    expect(await database.db.select().from(comments).where(eq(comments.sheetId, sheetId))).toEqual([]);

    await database.client.execute('DROP TRIGGER refuse_audit');
    await addComment(database, input);
    expect(await database.db.select().from(comments).where(eq(comments.sheetId, sheetId))).toHaveLength(1);
    expect(await events('sheet.comment')).toMatchObject([{ subject: sheetId, actorId: userId, detail: { revision: 1 } }]);
  });

  it('renaming a team: the old name stays without its event, both change with it', async () => {
    const [team] = await database.db.select().from(teams).where(eq(teams.id, teamId));
    await refuseAudit();
    await expect(renameTeam(database, { teamId, name: team.name }, 'Renamed team', { userId })).rejects.toThrow();
    expect((await database.db.select().from(teams).where(eq(teams.id, teamId)))[0].name).toBe(team.name);

    await database.client.execute('DROP TRIGGER refuse_audit');
    await renameTeam(database, { teamId, name: team.name }, 'Renamed team', { userId });
    expect((await database.db.select().from(teams).where(eq(teams.id, teamId)))[0].name).toBe('Renamed team');
    expect(await events('team.rename')).toMatchObject([{ actorId: userId, detail: { from: team.name, to: 'Renamed team' } }]);
  });

  it('deleting a sheet: it stays live without its event, both with it', async () => {
    await refuseAudit();
    await expect(deleteSheet(database, sheetId, { userId })).rejects.toThrow();
    expect(await findSheet(database, sheetId)).not.toBeNull();

    await database.client.execute('DROP TRIGGER refuse_audit');
    await deleteSheet(database, sheetId, { userId });
    expect(await findSheet(database, sheetId)).toBeNull();
    const [row] = await database.db.select().from(sheets).where(eq(sheets.id, sheetId));
    expect(row.deletedAt).not.toBeNull();
    expect(await events('sheet.delete')).toMatchObject([{ subject: sheetId, actorId: userId, detail: { title: 'Audited together' } }]);
  });
});
