import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../../../src/lib/roles';
import type { Identity } from '../../../../src/lib/server/access';
import { getDatabase } from '../../../../src/lib/server/database';
import { loadSheetPage } from '../../../../src/lib/server/sheet-page';
import { findSheet } from '../../../../src/lib/server/sheets';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import * as commentsRoute from '../../../../src/pages/api/sheets/[sheetId]/comments';
import * as reviewsRoute from '../../../../src/pages/api/sheets/[sheetId]/reviews';
import * as sheetRoute from '../../../../src/pages/api/sheets/[sheetId]/index';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';
import { startTestOutbox, waitForMailboxMail, type TestOutbox } from '../../../helpers/mail';

const example = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));
let teamId: string;
let people: Record<Role, Identity>;

let outbox: TestOutbox;

beforeAll(async () => {
  ({ teamId, identities: people } = await createTeamWithRoles('reviews'));
  outbox = await startTestOutbox();
});

afterAll(async () => {
  await outbox?.close();
});

async function newSheet(): Promise<string> {
  const reply = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Review me', document: example }, identity: people.editor }));
  return (await reply.json()).sheetId;
}

const review = (sheetId: string, revision: number, verdict: string, identity = people.reviewer) =>
  reviewsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision, verdict, body: 'Roll rate of the left finger is off by a factor of two.' }, identity }));

describe('checking a revision', () => {
  it('signing the latest revision as checked marks the sheet checked; returning it marks it returned for correction', async () => {
    const sheetId = await newSheet();
    expect(await (await review(sheetId, 1, 'checked')).json()).toMatchObject({ status: 'checked' });
    expect(await (await review(sheetId, 1, 'returned')).json()).toMatchObject({ status: 'returned' });
    const list = await (await reviewsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(list.status).toBe('returned');
    expect(list.items.map((r: { verdict: string }) => r.verdict)).toEqual(['returned', 'checked']);
  });

  it('a signature on an older revision is recorded but does not change the state of a newer one', async () => {
    const sheetId = await newSheet();
    await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example, message: 'edit' }, identity: people.editor }));
    expect(await (await review(sheetId, 1, 'checked')).json()).toMatchObject({ status: 'draft' });
  });

  it('saving a revision makes it a draft: a check of revision 1 does not carry over to revision 2', async () => {
    const sheetId = await newSheet();
    await review(sheetId, 1, 'checked');
    const saved = await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example, message: 'unchecked edit' }, identity: people.editor }));
    expect(saved.status).toBe(201);
    const list = await (await reviewsRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(list).toMatchObject({ status: 'draft', latestRevision: 2, lastCheckedRevision: 1 });
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(detail.sheet).toMatchObject({ reviewState: 'draft', lastCheckedRevision: 1 });
    expect(detail.revision).toMatchObject({ number: 2, reviewState: 'draft' });
    expect(await (await review(sheetId, 2, 'checked')).json()).toMatchObject({ status: 'checked' });
    const checked = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(checked.sheet).toMatchObject({ reviewState: 'checked', lastCheckedRevision: 2 });
  });

  it('refuses an editor, the old verdicts and an unknown one (located), a return without remarks (located) and a missing revision (located)', async () => {
    const sheetId = await newSheet();
    expect((await review(sheetId, 1, 'checked', people.editor)).status).toBe(403);
    for (const old of ['approved', 'changes-requested', 'looks-fine']) {
      const refused = await review(sheetId, 1, old);
      expect(refused.status).toBe(400);
      const { error } = await refused.json();
      expect(error.path).toBe('verdict');
      expect(error.message).toMatch(/"checked" or "returned"/);
    }
    const silentReturn = await reviewsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 1, verdict: 'returned' }, identity: people.reviewer }));
    expect(silentReturn.status).toBe(400);
    expect((await silentReturn.json()).error.path).toBe('body');
    const missing = await review(sheetId, 9, 'checked');
    expect(missing.status).toBe(400);
    expect((await missing.json()).error.path).toBe('revision');
  });

  it("mails the revision's author when a checker signs it as checked and when the checker returns it", async () => {
    const sheetId = await newSheet();
    const author = people.editor.user.email!;
    await review(sheetId, 1, 'checked');
    const checked = await waitForMailboxMail(outbox.mailboxDir, author, { subject: 'Checked: Review me, rev 1' });
    expect(checked.text).toContain(`${people.reviewer.user.name} signed revision 1 of "Review me" as checked.`);
    expect(checked.text).toContain(`/sheets/${sheetId}?revision=1`);
    await review(sheetId, 1, 'returned');
    const returned = await waitForMailboxMail(outbox.mailboxDir, author, { subject: 'Returned for correction: Review me, rev 1' });
    expect(returned.text).toContain('Roll rate of the left finger is off by a factor of two.');
  });

  it('fills "Checked by" and its date from the latest signature on the revision, and clears it when the revision is returned', async () => {
    const sheetId = await newSheet();
    const database = await getDatabase();
    const page = async () => {
      const loaded = await loadSheetPage(database, people.viewer, (await findSheet(database, sheetId))!, null);
      if (!loaded.ok) throw new Error(loaded.error.message);
      return loaded.value;
    };
    expect(await page()).toMatchObject({ checkedBy: null, checkedAt: null });
    const before = Date.now();
    await review(sheetId, 1, 'checked');
    const signed = await page();
    expect(signed.checkedBy).toBe(people.reviewer.user.name);
    expect(Date.parse(signed.checkedAt!)).toBeGreaterThanOrEqual(before - 1000);
    await review(sheetId, 1, 'returned');
    expect(await page()).toMatchObject({ checkedBy: null, checkedAt: null });
  });
});

describe('remarks', () => {
  const post = (sheetId: string, body: Record<string, unknown>, identity: Identity) =>
    commentsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 1, ...body }, identity }));
  const resolve = (sheetId: string, id: string, resolved: boolean, identity: Identity) =>
    commentsRoute.PATCH(apiContext({ method: 'PATCH', params: { sheetId }, body: { id, resolved }, identity }));
  const remarks = async (sheetId: string, identity = people.viewer) => (await (await commentsRoute.GET(apiContext({ params: { sheetId }, identity }))).json()).items;

  it('keeps remarks in order with their author, and refuses empty ones', async () => {
    const sheetId = await newSheet();
    expect((await post(sheetId, { body: 'Left roll rate looks high.', anchor: 'results' }, people.reviewer)).status).toBe(201);
    expect((await post(sheetId, { body: 'Rate limit is 6 rad/s; it is within.', anchor: 'results' }, people.editor)).status).toBe(201);
    expect((await post(sheetId, { body: '   ' }, people.editor)).status).toBe(400);
    expect((await post(sheetId, { body: 'viewers cannot' }, people.viewer)).status).toBe(403);
    expect((await remarks(sheetId)).map((c: { body: string; authorName: string }) => [c.body, c.authorName])).toEqual([
      ['Left roll rate looks high.', people.reviewer.user.name],
      ['Rate limit is 6 rad/s; it is within.', people.editor.user.name],
    ]);
  });

  it('anchors to a section or a catalogued output and refuses anything else, naming the field', async () => {
    const sheetId = await newSheet();
    expect((await post(sheetId, { body: 'Check this.', anchor: 'output.contact.gap' }, people.reviewer)).status).toBe(201);
    for (const anchor of ['output.noSuchOutput', 'javascript:alert(1)', 'sidebar']) {
      const refused = await post(sheetId, { body: 'Check this.', anchor }, people.reviewer);
      expect(refused.status).toBe(400);
      expect((await refused.json()).error.path).toBe('anchor');
    }
    const tooLong = await post(sheetId, { body: 'x'.repeat(4001) }, people.reviewer);
    expect(tooLong.status).toBe(400);
    expect((await tooLong.json()).error.path).toBe('body');
  });

  it('threads a reply under the remark it answers, on that remark\'s revision and anchor; a reply to a reply joins the same thread', async () => {
    const sheetId = await newSheet();
    const opening = await (await post(sheetId, { body: 'Is the contact radius right?', anchor: 'hand' }, people.reviewer)).json();
    const reply = await (await post(sheetId, { body: 'Yes, 12 mm.', parentId: opening.id }, people.editor)).json();
    const second = await (await post(sheetId, { body: 'Thanks.', parentId: reply.id }, people.reviewer)).json();
    const items = await remarks(sheetId);
    const byId = new Map(items.map((c: { id: string }) => [c.id, c]));
    expect(byId.get(reply.id)).toMatchObject({ parentId: opening.id, anchor: 'hand', revision: 1 });
    expect(byId.get(second.id)).toMatchObject({ parentId: opening.id, anchor: 'hand' });
    const stranger = await post(sheetId, { body: 'Reply to nothing.', parentId: crypto.randomUUID() }, people.reviewer);
    expect(stranger.status).toBe(400);
    expect((await stranger.json()).error.path).toBe('parentId');
  });

  it('the revision\'s author or a checker resolves and reopens a thread; others may not', async () => {
    const sheetId = await newSheet();
    const opening = await (await post(sheetId, { body: 'Units of the roll rate?', anchor: 'results' }, people.reviewer)).json();
    const reply = await (await post(sheetId, { body: 'rad/s', parentId: opening.id }, people.editor)).json();
    const outsider = (await createTeamWithRoles('remark-outsider')).identities.editor;
    expect((await resolve(sheetId, opening.id, true, outsider)).status).toBe(404);
    expect((await resolve(sheetId, opening.id, true, people.viewer)).status).toBe(403);
    const canResolve = async (identity: Identity) => (await remarks(sheetId, identity)).map((c: { id: string; canResolve: boolean }) => [c.id, c.canResolve]);
    expect(await canResolve(people.viewer)).toEqual([[opening.id, false], [reply.id, false]]);
    expect(await canResolve(people.reviewer)).toEqual([[opening.id, true], [reply.id, false]]);
    expect(await canResolve(people.editor)).toEqual([[opening.id, true], [reply.id, false]]);
    const byReply = await resolve(sheetId, reply.id, true, people.reviewer);
    expect(byReply.status).toBe(400);
    expect((await byReply.json()).error.path).toBe('id');

    expect((await resolve(sheetId, opening.id, true, people.editor)).status).toBe(200);
    const resolved = (await remarks(sheetId)).find((c: { id: string }) => c.id === opening.id);
    expect(resolved.resolvedAt).not.toBeNull();
    expect(resolved.resolvedByName).toBe(people.editor.user.name);
    expect((await resolve(sheetId, opening.id, false, people.reviewer)).status).toBe(200);
    expect((await remarks(sheetId)).find((c: { id: string }) => c.id === opening.id)).toMatchObject({ resolvedAt: null, resolvedByName: null });
  });

  it('an editor who did not write the revision may not resolve its remarks', async () => {
    const sheetId = await newSheet();
    const opening = await (await post(sheetId, { body: 'Check the grasp margin.' }, people.reviewer)).json();
    await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: 1, document: example, message: 'owner edit' }, identity: people.owner }));
    const onRevision2 = await (await commentsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 2, body: 'And here?' }, identity: people.reviewer }))).json();
    const refused = await resolve(sheetId, onRevision2.id, true, people.editor);
    expect(refused.status).toBe(403);
    expect((await refused.json()).error.path).toBe('id');
    expect((await resolve(sheetId, opening.id, true, people.editor)).status).toBe(200);
  });

  it('serves each remark as sanitised HTML with typeset math', async () => {
    const sheetId = await newSheet();
    await post(sheetId, { body: 'Slip $v_s = 0$ <script>alert(1)</script> [see](javascript:alert(2))' }, people.reviewer);
    const [remark] = await remarks(sheetId);
    expect(remark.html).toContain('class="katex"');
    expect(remark.html).not.toMatch(/<script|javascript:/i);
  });
});
