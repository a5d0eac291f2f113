import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Database } from '../../../src/db';
import { getDatabase } from '../../../src/lib/server/database';
import { createSheet, listRevisions, listSheets } from '../../../src/lib/server/sheets';
import { listSheetsQuery } from '../../../src/lib/validation/sheets';
import { GET as revisionsRoute } from '../../../src/pages/api/sheets/[sheetId]/revisions';
import { addTestMember, callRoute } from '../../helpers/api-context';
import { addRevisions } from '../../helpers/revisions';
import { createTestSheet, exampleSheetDocument } from '../../helpers/test-sheets';
import { identityForUser } from '../../../src/lib/server/identity';

const REVISIONS = 5_000;

describe('searching sheet titles', () => {
  it('takes % and _ literally: "50%" finds "Load at 50%" but not "Load at 500 N", "a_b" not "axb"', async () => {
    const database = await getDatabase();
    const { teamId, userId } = await addTestMember('editor');
    for (const title of ['Load at 50% grip', 'Load at 500 N', 'roller a_b', 'roller axb']) {
      await createSheet(database, { teamId, title, document: exampleSheetDocument, actor: { userId } });
    }
    const titles = async (q: string) => (await listSheets(database, listSheetsQuery.parse({ team: teamId, q }))).items.map((s) => s.title).sort();
    expect(await titles('50%')).toEqual(['Load at 50% grip']);
    expect(await titles('a_b')).toEqual(['roller a_b']);
    expect(await titles('500')).toEqual(['Load at 500 N']);
  });
});

describe('listing revisions of a sheet with thousands of them', () => {
  let database: Database;
  let sheetId: string;
  let identity: Awaited<ReturnType<typeof identityForUser>>;

  beforeAll(async () => {
    database = await getDatabase();
    const member = await addTestMember('viewer');
    identity = await identityForUser(database, member.userId, Date.now());
    const doc = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
    ({ sheetId } = await createTestSheet(database, member.teamId, 'Many revisions', doc));
    await addRevisions(database, sheetId, REVISIONS, doc);
  });

  it('returns one page, newest first, with the total and the next page', async () => {
    const first = await listRevisions(database, sheetId, { page: 1, pageSize: 50 });
    expect(first.items.map((r) => r.number)).toEqual(Array.from({ length: 50 }, (_, k) => REVISIONS + 1 - k));
    expect(first).toMatchObject({ total: REVISIONS + 1, page: 1, pageSize: 50, nextPage: 2 });
    const last = await listRevisions(database, sheetId, { page: 101, pageSize: 50 });
    expect(last.items.map((r) => r.number)).toEqual([1]);
    expect(last.nextPage).toBeNull();
  });

  it('answers GET /api/sheets/{id}/revisions with one bounded page and refuses page sizes above the maximum', async () => {
    const get = (search = '') => callRoute(revisionsRoute, { path: `/api/sheets/${sheetId}/revisions${search}`, params: { sheetId }, identity });
    const started = performance.now();
    const response = await get();
    const text = await response.text();
    const elapsed = performance.now() - started;
    expect(response.status).toBe(200);
    const body = JSON.parse(text);
    expect(body.items).toHaveLength(50);
    expect(body).toMatchObject({ total: REVISIONS + 1, page: 1, pageSize: 50, nextPage: 2 });
    expect(text.length).toBeLessThan(50_000);
    expect(elapsed).toBeLessThan(2_000);

    const page = await (await get('?page=3&pageSize=100')).json();
    expect(page.items[0].number).toBe(REVISIONS + 1 - 200);
    expect(page.items).toHaveLength(100);
    expect((await get('?pageSize=101')).status).toBe(400);
    expect((await get('?page=0')).status).toBe(400);
    expect((await get('?page=abc')).status).toBe(400);
  });
});
