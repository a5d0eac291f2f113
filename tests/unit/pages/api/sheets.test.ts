import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../../../src/lib/roles';
import type { Identity } from '../../../../src/lib/server/access';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as sheetRoute from '../../../../src/pages/api/sheets/[sheetId]/index';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import * as forkRoute from '../../../../src/pages/api/sheets/[sheetId]/fork';
import { eq } from 'drizzle-orm';
import { auditEvents } from '../../../../src/db/schema';
import { getDatabase } from '../../../../src/lib/server/database';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';

const example = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
let teamId: string;
let people: Record<Role, Identity>;
let outsider: Identity;

async function create(identity: Identity, document: unknown = example) {
  return sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Peg tilt check', tags: ['peg'], document }, identity }));
}

beforeAll(async () => {
  ({ teamId, identities: people } = await createTeamWithRoles('sheets'));
  outsider = (await createTeamWithRoles('other')).identities.owner;
});

describe('POST /api/sheets', () => {
  it('creates a sheet at revision 1 with its computed summary for an editor', async () => {
    const response = await create(people.editor);
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.revision).toBe(1);
    expect(body.summary.fingers).toBe(example.hand.fingers.length);
  });

  it('refuses a reviewer (403) and a stranger to the team (404)', async () => {
    expect((await create(people.reviewer)).status).toBe(403);
    expect((await create(outsider)).status).toBe(404);
  });

  it('locates the error in a bad document', async () => {
    const bad = structuredClone(example);
    bad.hand.fingers[0].joints[0].axis = [0, 0, 0];
    const response = await create(people.editor, bad);
    expect(response.status).toBe(400);
    const { error } = await response.json();
    expect(error.path).toBe('document.hand.fingers[0].joints[0].axis');
    expect(error.issues.length).toBeGreaterThan(0);
  });

  it('locates a missing title', async () => {
    const response = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, document: example }, identity: people.editor }));
    expect(response.status).toBe(400);
    expect((await response.json()).error.path).toBe('title');
  });
});

describe('saving revisions', () => {
  it('saves on the latest revision, answers 409 for a stale base and loses nothing', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const save = (baseRevision: number, message: string) =>
      revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision, document: example, message }, identity: people.editor }));
    expect((await save(1, 'first edit')).status).toBe(201);
    const stale = await save(1, 'edit from an old tab');
    expect(stale.status).toBe(409);
    expect((await stale.json()).error).toMatchObject({ path: 'baseRevision', latestRevision: 2 });
    const list = await (await revisionsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(list.items.map((r: { number: number; message: string }) => [r.number, r.message])).toEqual([
      [2, 'first edit'],
      [1, 'Created'],
    ]);
  });

  it("answers a stale save with what the client needs to rebase: the latest revision's number, inputs, message and author", async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const theirs = { ...structuredClone(example), description: 'Their edit' };
    const save = (baseRevision: number, document: unknown, message: string) =>
      revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision, document, message }, identity: people.editor }));
    expect((await save(1, theirs, 'their edit')).status).toBe(201);
    const stale = await save(1, example, 'my edit');
    expect(stale.status).toBe(409);
    const { error } = await stale.json();
    expect(error).toMatchObject({ path: 'baseRevision', latestRevision: 2, latest: { number: 2, message: 'their edit', authorName: people.editor.user.name } });
    expect(error.latest.inputs).toEqual(theirs);
    expect(error.kind).toBeUndefined();
  });

  it('takes the title and tags from the saved document and writes the revision and its audit event together', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const renamed = { ...structuredClone(example), title: 'Peg tilt, renamed in the document', tags: ['renamed'] };
    const saved = await revisionsRoute.POST(
      apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: renamed, title: 'A second title, ignored', tags: ['ignored'] }, identity: people.editor }),
    );
    expect(saved.status).toBe(201);
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(detail.sheet).toMatchObject({ title: 'Peg tilt, renamed in the document', tags: ['renamed'], latestRevision: 2 });
    const database = await getDatabase();
    const events = await database.db.select().from(auditEvents).where(eq(auditEvents.subject, sheetId));
    expect(events.map((e) => [e.action, e.actorId])).toEqual(
      expect.arrayContaining([
        ['sheet.create', people.editor.user.id],
        ['sheet.save', people.editor.user.id],
      ]),
    );
  });

  it('stores nothing and audits nothing for an invalid save', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const bad = structuredClone(example);
    bad.hand.fingers[0].joints[0].axis = [0, 0, 0];
    const refused = await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: bad }, identity: people.editor }));
    expect(refused.status).toBe(400);
    expect((await refused.json()).error.path).toBe('document.hand.fingers[0].joints[0].axis');
    const database = await getDatabase();
    const events = await database.db.select().from(auditEvents).where(eq(auditEvents.subject, sheetId));
    expect(events.map((e) => e.action)).toEqual(['sheet.create']);
  });

  it('lets a reviewer read but not save, and hides the sheet from other teams', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const body = { baseRevision: 1, document: example };
    expect((await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body, identity: people.reviewer }))).status).toBe(403);
    expect((await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.reviewer }))).status).toBe(200);
    expect((await sheetRoute.GET(apiContext({ params: { sheetId }, identity: outsider }))).status).toBe(404);
    expect((await sheetRoute.GET(apiContext({ params: { sheetId } }))).status).toBe(401);
  });
});

describe('POST /api/sheets/{id}/fork', () => {
  it('copies a revision into a new sheet that remembers its origin', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const response = await forkRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 1, title: 'Bigger rollers' }, identity: people.editor }));
    expect(response.status).toBe(201);
    const fork = await response.json();
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId: fork.sheetId }, identity: people.viewer }))).json();
    expect(detail.sheet).toMatchObject({ title: 'Bigger rollers', forkedFromSheetId: sheetId, forkedFromRevision: 1 });
    expect(detail.revision.inputs).toEqual(example);
  });
});

describe('GET /api/sheets', () => {
  it('pages through the team sheets and filters by title or tag', async () => {
    const page = await (await sheetsRoute.GET(apiContext({ url: `http://127.0.0.1/api/sheets?team=${teamId}&pageSize=2&q=peg`, identity: people.viewer }))).json();
    expect(page.items.length).toBe(2);
    expect(page.total).toBeGreaterThanOrEqual(4);
    expect(page.items.every((s: { title: string; tags: string[] }) => /peg/i.test(s.title) || s.tags.includes('peg'))).toBe(true);
    const none = await (await sheetsRoute.GET(apiContext({ url: `http://127.0.0.1/api/sheets?team=${teamId}&q=zzz-no-match`, identity: people.viewer }))).json();
    expect(none).toMatchObject({ items: [], total: 0 });
  });
});

describe('forking into another team', () => {
  it('needs read on the source and write on the target team, and lands the fork there', async () => {
    const { getDatabase } = await import('../../../../src/lib/server/database');
    const { memberships } = await import('../../../../src/db/schema');
    const { identityForUser } = await import('../../../../src/lib/server/identity');
    const database = await getDatabase();
    const other = await createTeamWithRoles('fork-target');
    const { sheetId } = await (await create(people.editor)).json();
    // The source team's reviewer is also an editor in the other team.
    await database.write((db) => db.insert(memberships).values({ teamId: other.teamId, userId: people.reviewer.user.id, role: 'editor' }));
    const reviewerInBoth = (await identityForUser(database, people.reviewer.user.id, Date.now()))!;
    const fork = (identity: Identity, target: string) =>
      forkRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { teamId: target }, identity }));

    const response = await fork(reviewerInBoth, other.teamId);
    expect(response.status).toBe(201);
    const created = await response.json();
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId: created.sheetId }, identity: other.identities.viewer }))).json();
    expect(detail.sheet).toMatchObject({ teamId: other.teamId, forkedFromSheetId: sheetId });
    expect((await fork(reviewerInBoth, teamId)).status).toBe(403);
    expect((await fork(people.editor, other.teamId)).status).toBe(404);
  });
});

describe('messages that say what is wrong', () => {
  it('names a missing document and an over-long message with their limits', async () => {
    const missing = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'No document' }, identity: people.editor }));
    expect(missing.status).toBe(400);
    expect((await missing.json()).error).toEqual({ message: 'document is required', path: 'document' });
    const long = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Long', document: example, message: 'm'.repeat(501), tags: [] }, identity: people.editor }));
    expect((await long.json()).error).toEqual({ message: 'at most 500 characters', path: 'message' });
    const tags = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Tags', document: example, tags: Array(21).fill('t') }, identity: people.editor }));
    expect((await tags.json()).error).toEqual({ message: 'at most 20 items', path: 'tags' });
    const revision = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Tags', document: example }, identity: people.editor }));
    const { sheetId } = await revision.json();
    const fraction = await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1.5, document: example }, identity: people.editor }));
    expect((await fraction.json()).error).toEqual({ message: 'expected a whole number', path: 'baseRevision' });
  });

  it.each(['0x1', '1e0', '1.0', ' 1', '+1', '0', '-1', 'one', ''])('reads ?revision=%s as no revision number (400 naming revision)', async (wanted) => {
    const created = await create(people.editor);
    const { sheetId } = await created.json();
    const response = await sheetRoute.GET(apiContext({ url: `http://127.0.0.1/api/sheets/${sheetId}?revision=${encodeURIComponent(wanted)}`, params: { sheetId }, identity: people.viewer }));
    expect(response.status).toBe(400);
    const { error } = await response.json();
    expect(error.path).toBe('revision');
    expect(error.message).toMatch(/revision number/i);
    const plain = await sheetRoute.GET(apiContext({ url: `http://127.0.0.1/api/sheets/${sheetId}?revision=1`, params: { sheetId }, identity: people.viewer }));
    expect(plain.status).toBe(200);
  });
});

describe('answers for sheets a caller cannot reach', () => {
  it('names sheetId in the same 404 for a missing sheet and for another team\'s sheet, and names the permission in a 403', async () => {
    const { sheetId } = await (await create(people.editor)).json();
    const missing = await sheetRoute.GET(apiContext({ params: { sheetId: '00000000-0000-4000-8000-000000000000' }, identity: people.viewer }));
    const elsewhere = await sheetRoute.GET(apiContext({ params: { sheetId }, identity: outsider }));
    expect([missing.status, elsewhere.status]).toEqual([404, 404]);
    const missingError = (await missing.json()).error;
    expect(missingError.path).toBe('sheetId');
    expect((await elsewhere.json()).error).toEqual(missingError);
    const refused = await revisionsRoute.POST(
      apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example }, identity: people.viewer }),
    );
    expect(refused.status).toBe(403);
    expect((await refused.json()).error.message).toMatch(/viewer\) does not allow sheet\.\w+/);
  });
});
