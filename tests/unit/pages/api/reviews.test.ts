import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../../../src/lib/roles';
import type { Identity } from '../../../../src/lib/server/access';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import * as commentsRoute from '../../../../src/pages/api/sheets/[sheetId]/comments';
import * as reviewsRoute from '../../../../src/pages/api/sheets/[sheetId]/reviews';
import * as sheetRoute from '../../../../src/pages/api/sheets/[sheetId]/index';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';

const example = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
let teamId: string;
let people: Record<Role, Identity>;

beforeAll(async () => {
  ({ teamId, identities: people } = await createTeamWithRoles('reviews'));
});

async function newSheet(): Promise<string> {
  const reply = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Review me', document: example }, identity: people.editor }));
  return (await reply.json()).sheetId;
}

const review = (sheetId: string, revision: number, verdict: string, identity = people.reviewer) =>
  reviewsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision, verdict, body: 'checked by hand' }, identity }));

describe('reviews', () => {
  it('approving the latest revision marks the sheet approved; asking for changes flips it back', async () => {
    const sheetId = await newSheet();
    expect(await (await review(sheetId, 1, 'approved')).json()).toMatchObject({ status: 'approved' });
    expect(await (await review(sheetId, 1, 'changes-requested')).json()).toMatchObject({ status: 'changes-requested' });
    const list = await (await reviewsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(list.status).toBe('changes-requested');
    expect(list.items.map((r: { verdict: string }) => r.verdict)).toEqual(['changes-requested', 'approved']);
  });

  it('a verdict on an older revision is recorded but does not change the status of a newer one', async () => {
    const sheetId = await newSheet();
    await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example, message: 'edit' }, identity: people.editor }));
    expect(await (await review(sheetId, 1, 'approved')).json()).toMatchObject({ status: 'draft' });
  });

  it('saving a revision makes it a draft: an approval of revision 1 does not carry over to revision 2', async () => {
    const sheetId = await newSheet();
    await review(sheetId, 1, 'approved');
    const saved = await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example, message: 'unreviewed edit' }, identity: people.editor }));
    expect(saved.status).toBe(201);
    const list = await (await reviewsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(list).toMatchObject({ status: 'draft', latestRevision: 2, lastCheckedRevision: 1 });
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(detail.sheet).toMatchObject({ reviewState: 'draft', lastCheckedRevision: 1 });
    expect(detail.revision).toMatchObject({ number: 2, reviewState: 'draft' });
    expect(await (await review(sheetId, 2, 'approved')).json()).toMatchObject({ status: 'approved' });
    const approved = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(approved.sheet).toMatchObject({ reviewState: 'approved', lastCheckedRevision: 2 });
  });

  it('refuses an editor, an unknown verdict (located) and a missing revision (located)', async () => {
    const sheetId = await newSheet();
    expect((await review(sheetId, 1, 'approved', people.editor)).status).toBe(403);
    const badVerdict = await review(sheetId, 1, 'looks-fine');
    expect(badVerdict.status).toBe(400);
    expect((await badVerdict.json()).error.path).toBe('verdict');
    const missing = await review(sheetId, 9, 'approved');
    expect(missing.status).toBe(400);
    expect((await missing.json()).error.path).toBe('revision');
  });
});

describe('comments', () => {
  it('keeps comments in order with their author, and refuses empty ones', async () => {
    const sheetId = await newSheet();
    const post = (body: string, identity: Identity) =>
      commentsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 1, body, anchor: 'results' }, identity }));
    expect((await post('Left roll rate looks high.', people.reviewer)).status).toBe(201);
    expect((await post('Rate limit is 6 rad/s; it is within.', people.editor)).status).toBe(201);
    expect((await post('   ', people.editor)).status).toBe(400);
    expect((await post('viewers cannot', people.viewer)).status).toBe(403);
    const { items } = await (await commentsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(items.map((c: { body: string; authorName: string }) => [c.body, c.authorName])).toEqual([
      ['Left roll rate looks high.', people.reviewer.user.name],
      ['Rate limit is 6 rad/s; it is within.', people.editor.user.name],
    ]);
  });
});
