import { and, eq, inArray, isNull } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { comments, memberships, reviews, sheetRevisions, sheets, teams, uploads, users } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { DEMO_USERS } from '../../../src/lib/server/demo';
import { listComments, listReviews } from '../../../src/lib/server/reviews';
import { findSheet, listForks, listRevisions, listSheets } from '../../../src/lib/server/sheets';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
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
    expect(fork.at(-1)?.message).toBe('Derived from rev 3');

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

const DAY = 24 * 3600 * 1000;

/** The seeded sheets of the demo team: the seed dates them weeks back, while other test files of this run add sheets dated now. */
async function seededSheets() {
  const database = await getDatabase();
  const all = await database.db.select().from(sheets).where(and(eq(sheets.teamId, await demoTeamId()), isNull(sheets.deletedAt)));
  return all.filter((sheet) => sheet.createdAt.getTime() < Date.now() - 7 * DAY);
}

describe('demo data as a first look shows it', () => {
  it('has coherent dates: team and people before their sheets, each sheet created with its first revision and updated with its last, revisions in order, signatures and remarks after what they answer, nothing in the future', async () => {
    const database = await getDatabase();
    const teamId = await demoTeamId();
    const now = Date.now();
    const [team] = await database.db.select().from(teams).where(eq(teams.id, teamId));
    const members = await database.db.select().from(memberships).where(eq(memberships.teamId, teamId));
    const people = await database.db.select().from(users).where(inArray(users.id, members.map((m) => m.userId)));
    const seeded = await seededSheets();
    expect(seeded.length).toBeGreaterThanOrEqual(8);
    const firstSheet = Math.min(...seeded.map((sheet) => sheet.createdAt.getTime()));
    const demoPeople = people.filter((person) => DEMO_USERS.some((demo) => demo.email === person.email));
    for (const moment of [team.createdAt, ...demoPeople.map((p) => p.createdAt)]) expect(moment.getTime()).toBeLessThan(firstSheet);
    for (const sheet of seeded) {
      const revisions = await database.db.select().from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheet.id)).orderBy(sheetRevisions.number);
      const times = revisions.map((r) => r.createdAt.getTime());
      expect(times[0], sheet.title).toBe(sheet.createdAt.getTime());
      expect(times.every((t, i) => i === 0 || t > times[i - 1]), sheet.title).toBe(true);
      expect(sheet.createdAt.getTime()).toBeLessThanOrEqual(sheet.updatedAt.getTime());
      if (sheet.forkedFromSheetId) {
        const [origin] = await database.db
          .select()
          .from(sheetRevisions)
          .where(and(eq(sheetRevisions.sheetId, sheet.forkedFromSheetId), eq(sheetRevisions.number, sheet.forkedFromRevision!)));
        expect(origin.createdAt.getTime(), `${sheet.title} derived after its origin's revision`).toBeLessThan(sheet.createdAt.getTime());
      }
      const signed = await database.db.select().from(reviews).where(eq(reviews.sheetId, sheet.id));
      for (const review of signed) expect(review.createdAt.getTime()).toBeGreaterThan(times[review.revision - 1]);
      const remarks = await database.db.select().from(comments).where(eq(comments.sheetId, sheet.id));
      for (const remark of remarks) {
        expect(remark.createdAt.getTime()).toBeGreaterThanOrEqual(times[remark.revision - 1]);
        const replies = remarks.filter((reply) => reply.parentId === remark.id);
        for (const reply of replies) expect(reply.createdAt.getTime()).toBeGreaterThan(remark.createdAt.getTime());
        if (remark.resolvedAt) for (const moment of [remark.createdAt, ...replies.map((r) => r.createdAt)]) expect(remark.resolvedAt.getTime()).toBeGreaterThan(moment.getTime());
      }
      const logs = await database.db.select().from(uploads).where(eq(uploads.sheetId, sheet.id));
      for (const log of logs) expect(log.createdAt.getTime()).toBeGreaterThan(sheet.createdAt.getTime());
      for (const moment of [...times, ...signed.map((r) => r.createdAt.getTime()), ...remarks.map((r) => r.createdAt.getTime()), ...logs.map((l) => l.createdAt.getTime())]) {
        expect(moment).toBeLessThanOrEqual(now);
      }
    }
  });

  it('opens the list on a telling sheet: non-zero commanded rates, a caution with its numbers, variables and notes', async () => {
    const database = await getDatabase();
    const seeded = new Set((await seededSheets()).map((sheet) => sheet.id));
    // The list's default order, latest change first, among the seeded sheets.
    const page = await listSheets(database, { team: await demoTeamId(), warnings: 'any', sort: 'updated', page: 1, pageSize: 100 });
    const first = page.items.find((item) => seeded.has(item.id))!;
    const [latest] = await database.db
      .select()
      .from(sheetRevisions)
      .where(and(eq(sheetRevisions.sheetId, first.id), eq(sheetRevisions.number, first.latestRevision)));
    const inputs = latest.inputs as { variables?: string; notes?: string };
    expect(inputs.variables?.split('\n').length, first.title).toBeGreaterThanOrEqual(2);
    expect(inputs.notes?.length, first.title).toBeGreaterThan(100);
    const evaluated = evaluateSheet(latest.inputs);
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const rates = evaluated.value.result.fingers.flatMap((finger) => finger.steer.rates);
    expect(rates.some((rate) => Math.abs(rate) > 0.1)).toBe(true);
    const caution = evaluated.value.result.warnings.find((w) => w.severity !== 'note');
    // The warning carries the rate it judged and the limit: 15 rpm = 15 * 2 pi / 60 = pi/2 rad/s (unit conversion, common practice).
    expect(caution).toMatchObject({ code: 'RATE_LIMIT_EXCEEDED', threshold: expect.closeTo(Math.PI / 2, 12) });
    expect(caution!.value).toBeGreaterThan(caution!.threshold!);
  });
});
