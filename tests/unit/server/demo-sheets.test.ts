import { and, eq, isNull } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { sheets } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { listComments, listReviews } from '../../../src/lib/server/reviews';
import { findSheet, listForks, listRevisions } from '../../../src/lib/server/sheets';
import { WARNING_CATALOGUE } from '../../../src/lib/kinematics';
import { demoTeamId } from '../../helpers/api-context';

describe('demo sheets seeded into the run database', () => {
  it('give the peg sheet three revisions and a fork with two, and make the retrofit sheet a fork of the bearing housing', async () => {
    const database = await getDatabase();
    const teamId = await demoTeamId();
    const all = await database.db.select().from(sheets).where(and(eq(sheets.teamId, teamId), isNull(sheets.deletedAt)));
    const byTitle = (title: string) => all.find((s) => s.title === title)!;
    const peg = byTitle('Peg: tilt about the grip line');
    const { items: pegRevisions } = await listRevisions(database, peg.id, { page: 1, pageSize: 50 });
    expect(pegRevisions.map((r) => r.number)).toEqual([3, 2, 1]);
    expect(new Set(pegRevisions.map((r) => r.message)).size).toBe(3);

    const forks = await listForks(database, peg.id, [teamId]);
    expect(forks).toEqual([expect.objectContaining({ title: 'Peg: tilt with 16 mm rollers', forkedFromRevision: 3, latestRevision: 2 })]);
    const { items: fork } = await listRevisions(database, forks[0].id, { page: 1, pageSize: 50 });
    expect(fork.at(-1)?.message).toBe('Forked from revision 3');

    const retrofit = byTitle('Retrofit fingers: mounting review');
    expect(retrofit).toMatchObject({ forkedFromSheetId: byTitle('Bearing housing: index a quarter turn').id, forkedFromRevision: 1, latestRevision: 2 });
  });

  it('raise every kind of warning between them (latest revisions)', async () => {
    const database = await getDatabase();
    const teamId = await demoTeamId();
    const all = await database.db.select().from(sheets).where(and(eq(sheets.teamId, teamId), isNull(sheets.deletedAt)));
    const codes = new Set<string>();
    for (const sheet of all) {
      const {
        items: [latest],
      } = await listRevisions(database, sheet.id, { page: 1, pageSize: 1 });
      for (const code of latest.summary?.warningCodes ?? []) codes.add(code);
    }
    expect([...codes].sort()).toEqual(Object.keys(WARNING_CATALOGUE).sort());
  });

  it('hold a checked revision and one returned for correction with threaded remarks', async () => {
    const database = await getDatabase();
    const teamId = await demoTeamId();
    const all = await database.db.select().from(sheets).where(and(eq(sheets.teamId, teamId), isNull(sheets.deletedAt)));
    const byTitle = (title: string) => all.find((s) => s.title === title)!;
    const peg = byTitle('Peg: tilt about the grip line');
    expect(await findSheet(database, peg.id)).toMatchObject({ reviewState: 'checked', lastCheckedRevision: 3 });
    expect(await listReviews(database, peg.id)).toEqual([expect.objectContaining({ revision: 3, verdict: 'checked', reviewerName: 'Mei Arroyo' })]);

    const retrofit = byTitle('Retrofit fingers: mounting review');
    expect(await findSheet(database, retrofit.id)).toMatchObject({ reviewState: 'returned', lastCheckedRevision: null });
    const remarks = await listComments(database, retrofit.id, { userId: 'a reader who wrote nothing', mayCheck: false });
    const openings = remarks.filter((c) => c.parentId === null);
    expect(openings.map((c) => c.anchor)).toEqual(['hand', 'results']);
    expect(remarks.filter((c) => c.parentId === openings[0].id)).toHaveLength(1);
    expect(openings.every((c) => c.resolvedAt === null)).toBe(true);
    expect(openings[1].html).toContain('class="katex"');
    expect(remarks.some((c) => c.canResolve)).toBe(false);
  });
});
