import { and, eq, isNull } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { sheetRevisions, sheets } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { listSheets } from '../../../src/lib/server/sheets';
import { SHEET_SORTS, WARNING_FILTERS, type ListSheetsQuery } from '../../../src/lib/validation/sheets';
import { demoTeamId } from '../../helpers/api-context';

// The list is checked against the same filters applied by hand to the team's rows: SQL LIKE with
// literal % and _ matches ASCII letters in either case (SQLite documentation, "The LIKE operator"),
// and paging is LIMIT/OFFSET over one order (common practice).

interface Row {
  id: string;
  title: string;
  tags: string[];
  createdBy: string | null;
  createdAt: Date;
  updatedAt: Date;
  worst: string | undefined;
}

let team: string;
let rows: Row[];

beforeAll(async () => {
  const database = await getDatabase();
  team = await demoTeamId();
  const live = await database.db.select().from(sheets).where(and(eq(sheets.teamId, team), isNull(sheets.deletedAt)));
  rows = await Promise.all(
    live.map(async (sheet) => {
      const [latest] = await database.db
        .select({ summary: sheetRevisions.summary })
        .from(sheetRevisions)
        .where(and(eq(sheetRevisions.sheetId, sheet.id), eq(sheetRevisions.number, sheet.latestRevision)));
      return { ...sheet, worst: (latest?.summary as { worst?: string } | null)?.worst };
    }),
  );
});

const contains = (text: string, q: string) => text.toLowerCase().includes(q.toLowerCase());

function expected(query: Omit<ListSheetsQuery, 'page' | 'pageSize' | 'sort'>): Row[] {
  return rows.filter(
    (row) =>
      (!query.q || contains(row.title, query.q) || row.tags.some((tag) => contains(tag, query.q!))) &&
      (!query.author || row.createdBy === query.author) &&
      (query.warnings === 'any' || row.worst === (query.warnings === 'clean' ? 'none' : query.warnings)),
  );
}

/** Every page of a list, three sheets a page, joined. */
async function allPages(query: Omit<ListSheetsQuery, 'page' | 'pageSize'>) {
  const database = await getDatabase();
  const items = [];
  let total = -1;
  for (let page = 1; page < 100; page++) {
    const answer = await listSheets(database, { ...query, page, pageSize: 3 });
    total = answer.total;
    items.push(...answer.items);
    if (answer.items.length < 3) break;
  }
  return { items, total };
}

describe('listing a team\'s sheets', () => {
  it('has sheets of several warning levels and authors to list', () => {
    expect(rows.length).toBeGreaterThan(3);
    expect(new Set(rows.map((r) => r.worst)).size).toBeGreaterThan(1);
  });

  it('finds exactly the matching sheets under every warning filter and sort, in that sort\'s order, with the right total', async () => {
    for (const warnings of WARNING_FILTERS) {
      for (const sort of SHEET_SORTS) {
        const want = expected({ team, warnings });
        const { items, total } = await allPages({ team, warnings, sort });
        expect(total, `${warnings} ${sort}`).toBe(want.length);
        expect(items.map((i) => i.id).sort(), `${warnings} ${sort}`).toEqual(want.map((r) => r.id).sort());
        const byId = new Map(rows.map((r) => [r.id, r]));
        const keys = items.map((i) => byId.get(i.id)!);
        for (let k = 1; k < keys.length; k++) {
          if (sort === 'title') expect(keys[k - 1].title <= keys[k].title).toBe(true);
          else if (sort === 'created') expect(keys[k - 1].createdAt.getTime()).toBeGreaterThanOrEqual(keys[k].createdAt.getTime());
          else expect(keys[k - 1].updatedAt.getTime()).toBeGreaterThanOrEqual(keys[k].updatedAt.getTime());
        }
      }
    }
  });

  it('filters by author and by words of titles and tags, alone and together', async () => {
    const author = rows.find((r) => r.createdBy)!.createdBy!;
    const word = rows[0].title.split(/\s+/).find((w) => w.length > 3) ?? rows[0].title;
    const tag = rows.flatMap((r) => r.tags)[0];
    const queries = [
      { team, warnings: 'any' as const, author },
      { team, warnings: 'any' as const, q: word.toUpperCase() },
      { team, warnings: 'any' as const, q: word, author },
      ...(tag ? [{ team, warnings: 'any' as const, q: tag }] : []),
      { team, warnings: 'any' as const, q: 'no sheet is called this' },
    ];
    for (const query of queries) {
      const { items, total } = await allPages({ ...query, sort: 'title' });
      expect(total, JSON.stringify(query)).toBe(expected(query).length);
      expect(items.map((i) => i.id).sort(), JSON.stringify(query)).toEqual(expected(query).map((r) => r.id).sort());
    }
  });

  it('answers a page past the end with no items and the full total', async () => {
    const database = await getDatabase();
    const answer = await listSheets(database, { team, warnings: 'any', sort: 'updated', page: 1000, pageSize: 3 });
    expect(answer.items).toEqual([]);
    expect(answer.total).toBe(rows.length);
  });

  it('gives the total on a page past the end and on an empty first page, where no row carries the count', async () => {
    const database = await getDatabase();
    const all = expected({ team, warnings: 'any' });
    const past = await listSheets(database, { team, warnings: 'any', sort: 'title', page: all.length + 1, pageSize: 1 });
    expect(past.items).toEqual([]);
    expect(past.total).toBe(all.length);
    const none = await listSheets(database, { team, warnings: 'any', sort: 'title', q: 'no sheet is called this', page: 1, pageSize: 5 });
    expect(none).toMatchObject({ items: [], total: 0 });
  });
});
