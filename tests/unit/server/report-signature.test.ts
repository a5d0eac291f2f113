import { and, eq, isNull } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { reviews, sheets } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { reportCheckedBy } from '../../../src/lib/server/report-signature';
import { getRevision } from '../../../src/lib/server/sheets';
import { demoTeamId } from '../../helpers/api-context';

async function demoSheet(title: string) {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  const [sheet] = await database.db.select().from(sheets).where(and(eq(sheets.teamId, teamId), eq(sheets.title, title), isNull(sheets.deletedAt)));
  return { database, sheet: sheet! };
}

describe('"Checked by" on the print report', () => {
  it('names the checker and the day of the signature for a revision signed as checked', async () => {
    const { database, sheet } = await demoSheet('Peg: tilt about the grip line');
    const revision = (await getRevision(database, sheet.id, 3))!;
    // The demo checker signed revision 3 (the demo's own signing record, read independently of the report).
    const [signature] = await database.db.select().from(reviews).where(and(eq(reviews.sheetId, sheet.id), eq(reviews.revision, 3)));
    expect(await reportCheckedBy(database, sheet.id, revision)).toEqual({ state: 'checked', name: 'Mei Arroyo', at: new Date(signature!.createdAt) });
  });

  it('says the revision was returned for correction, without a name, when it was sent back', async () => {
    const { database, sheet } = await demoSheet('Retrofit fingers: mounting review');
    const revision = (await getRevision(database, sheet.id, 2))!;
    expect(await reportCheckedBy(database, sheet.id, revision)).toEqual({ state: 'returned' });
  });

  it('leaves a blank line for a draft revision', async () => {
    const { database, sheet } = await demoSheet('Peg: tilt about the grip line');
    const revision = (await getRevision(database, sheet.id, 1))!;
    expect(revision.reviewState).toBe('draft');
    expect(await reportCheckedBy(database, sheet.id, revision)).toEqual({ state: 'draft' });
  });
});
