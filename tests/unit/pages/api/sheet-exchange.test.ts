import { readFileSync } from 'node:fs';
import { SAFETY_CAUTION_TEXT } from '../../../../src/lib/safety';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../../../src/lib/roles';
import { solveSheet } from '../../../../src/lib/kinematics';
import type { Identity } from '../../../../src/lib/server/access';
import { MAX_JSON_VALUES } from '../../../../src/lib/server/json-depth';
import { largestSheet } from '../../../../src/lib/sheet/largest-sheet';
import { MAX_SHEET_ISSUES, parseSheet } from '../../../../src/lib/sheet/schema';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as importRoute from '../../../../src/pages/api/sheets/import';
import * as sheetRoute from '../../../../src/pages/api/sheets/[sheetId]/index';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import * as forkRoute from '../../../../src/pages/api/sheets/[sheetId]/fork';
import * as compareRoute from '../../../../src/pages/api/sheets/[sheetId]/compare';
import * as exportRoute from '../../../../src/pages/api/sheets/[sheetId]/export';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';

const exampleText = readFileSync('content/sheets/line4-peg-tilt.json', 'utf8');
const example = JSON.parse(exampleText);
let teamId: string;
let people: Record<Role, Identity>;
let outsider: Identity;
let outsiderTeamId: string;

const url = (path: string) => `http://127.0.0.1${path}`;

async function createSheet(identity: Identity, document: unknown = example, team = teamId): Promise<string> {
  const response = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId: team, title: 'Peg tilt, exchange', tags: ['peg'], document }, identity }));
  expect(response.status).toBe(201);
  return (await response.json()).sheetId;
}

async function importContent(content: string, fileName = 'peg.json', identity = people.editor) {
  const response = await importRoute.POST(apiContext({ method: 'POST', body: { teamId, fileName, content }, identity }));
  return { status: response.status, body: await response.json() };
}

beforeAll(async () => {
  ({ teamId, identities: people } = await createTeamWithRoles('exchange'));
  const other = await createTeamWithRoles('exchange-other');
  outsider = other.identities.owner;
  outsiderTeamId = other.teamId;
});

describe('GET /api/sheets/{id}/compare across a fork', () => {
  it('lists the changed input and recomputes the outputs, matching an independent solve', async () => {
    const sheetId = await createSheet(people.editor);
    const fork = await (await forkRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { revision: 1, title: 'Peg, 16 mm rollers' }, identity: people.editor }))).json();
    const changed = structuredClone(example);
    changed.hand.fingers[0].roller.radius = '16 mm';
    const saved = await revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId: fork.sheetId }, body: { baseRevision: 1, document: changed, message: 'bigger left roller' }, identity: people.editor }));
    expect(saved.status).toBe(201);

    const response = await compareRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/compare?from=1&to=2&toSheet=${fork.sheetId}`), params: { sheetId }, identity: people.viewer }));
    expect(response.status).toBe(200);
    const comparison = await response.json();
    expect(comparison.from).toMatchObject({ sheetId, revision: 1 });
    expect(comparison.to).toMatchObject({ sheetId: fork.sheetId, revision: 2, message: 'bigger left roller' });
    expect(comparison.inputChanges).toEqual([{ path: 'hand.fingers[0].roller.radius', kind: 'changed', before: 0.014, after: '16 mm' }]);
    expect(comparison.fields.find((f: { path: string }) => f.path === 'hand.fingers[0].roller.radius')).toMatchObject({ kind: 'changed' });

    // The same numbers from the kinematics core directly: a 2 mm larger roller about the same centre presses 2 mm into the peg.
    const before = solveSheet((parseSheet(example) as { ok: true; doc: never }).doc);
    const after = solveSheet((parseSheet(changed) as { ok: true; doc: never }).doc);
    const gap = comparison.outputs.find((r: { group: string; quantity: string }) => r.group === 'left' && r.quantity === 'gap');
    expect(gap.from).toBeCloseTo(before.fingers[0].contact.gap, 12);
    expect(gap.to).toBeCloseTo(after.fingers[0].contact.gap, 12);
    expect(gap.absolute).toBeCloseTo(after.fingers[0].contact.gap - before.fingers[0].contact.gap, 12);
    expect(gap.absolute).toBeCloseTo(-0.002, 9);
    expect(gap.level).toBe('major');
    const rightGap = comparison.outputs.find((r: { group: string; quantity: string }) => r.group === 'right' && r.quantity === 'gap');
    expect(rightGap).toMatchObject({ absolute: 0, level: 'same' });
    const addedCodes = comparison.warnings.added.map((w: { code: string }) => w.code);
    const beforeCodes = new Set(before.warnings.map((w) => `${w.code}/${w.finger}`));
    const expectedAdded = after.warnings.filter((w) => !beforeCodes.has(`${w.code}/${w.finger}`)).map((w) => w.code);
    expect(addedCodes.sort()).toEqual(expectedAdded.sort());
    expect(addedCodes).toContain('CONTACT_PENETRATING');
  });

  it('answers 404 when the other sheet belongs to a team the caller cannot read, and 400 for a missing revision number', async () => {
    const sheetId = await createSheet(people.editor);
    const foreign = await createSheet(outsider, example, outsiderTeamId);
    const across = await compareRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/compare?from=1&to=1&toSheet=${foreign}`), params: { sheetId }, identity: people.owner }));
    expect(across.status).toBe(404);
    const reverse = await compareRoute.GET(apiContext({ url: url(`/api/sheets/${foreign}/compare?from=1&to=1&toSheet=${sheetId}`), params: { sheetId: foreign }, identity: outsider }));
    expect(reverse.status).toBe(404);
    const noTo = await compareRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/compare?from=1`), params: { sheetId }, identity: people.viewer }));
    expect(noTo.status).toBe(400);
    expect((await noTo.json()).error.path).toBe('to');
    const missing = await compareRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/compare?from=1&to=9`), params: { sheetId }, identity: people.viewer }));
    expect(missing.status).toBe(404);
  });

  it('shows the forks of a sheet on GET /api/sheets/{id}', async () => {
    const sheetId = await createSheet(people.editor);
    const fork = await (await forkRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { title: 'A fork to list' }, identity: people.editor }))).json();
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId }, identity: people.viewer }))).json();
    expect(detail.forks).toEqual([expect.objectContaining({ id: fork.sheetId, title: 'A fork to list', forkedFromRevision: 1 })]);
  });
});

describe('GET /api/sheets/{id}/export', () => {
  it('exports the stored document as an attachment that imports back to the same document', async () => {
    const sheetId = await createSheet(people.editor);
    const response = await exportRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/export?revision=1&format=json`), params: { sheetId }, identity: people.viewer }));
    expect(response.status).toBe(200);
    expect(response.headers.get('content-disposition')).toBe('attachment; filename="peg-tilt-exchange-r1.json"');
    const text = await response.text();
    const exported = JSON.parse(text);
    expect(exported).toMatchObject({ format: 'slipless.sheet', version: 1 });
    expect(exported).toEqual(example);

    const imported = await importContent(text, 'peg-tilt-exchange-r1.json');
    expect(imported.status).toBe(201);
    const detail = await (await sheetRoute.GET(apiContext({ params: { sheetId: imported.body.sheetId }, identity: people.viewer }))).json();
    expect(detail.revision.inputs).toEqual(exported);
    expect(detail.revision.message).toBe('Imported from peg-tilt-exchange-r1.json');
    expect(detail.sheet.title).toBe(example.title);
  });

  it('exports the results as CSV: the safety caution as a comment line, a header with units and one row per finger', async () => {
    const sheetId = await createSheet(people.editor);
    const response = await exportRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/export?format=csv`), params: { sheetId }, identity: people.reviewer }));
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(response.headers.get('content-disposition')).toMatch(/filename="peg-tilt-exchange-r1\.csv"/);
    const [comment, ...lines] = (await response.text()).trimEnd().split('\n');
    // A "#" comment line, which CSV readers such as pandas (comment='#') and papaparse (comments: '#') skip (common practice).
    expect(comment).toBe(`# Safety: ${SAFETY_CAUTION_TEXT}`);
    expect(lines.length).toBe(1 + example.hand.fingers.length);
    const header = lines[0].split(',');
    expect(header.slice(0, 3)).toEqual(['finger', 'contact_state', 'gap_m']);
    expect(header).toContain('steer_roll_rate_rad_s');
    expect(header.filter((h) => /^full_rate\d+_rad_s$/.test(h)).length).toBe(3);
    expect(header.filter((h) => /^commanded_rate\d+_rad_s$/.test(h)).length).toBe(3);
    expect(header).toContain('commanded_solution');
    expect(lines.slice(1).map((l) => l.split(',')[0])).toEqual(['left', 'right']);
    expect(lines.every((l) => l.split(',').length === header.length)).toBe(true);
  });

  it('refuses an unknown format and a missing revision', async () => {
    const sheetId = await createSheet(people.editor);
    const bad = await exportRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/export?format=xml`), params: { sheetId }, identity: people.viewer }));
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.path).toBe('format');
    const missing = await exportRoute.GET(apiContext({ url: url(`/api/sheets/${sheetId}/export?revision=4`), params: { sheetId }, identity: people.viewer }));
    expect(missing.status).toBe(404);
  });
});

describe('POST /api/sheets/import of bad files', () => {
  it('locates invalid JSON by line and column', async () => {
    // A trailing comma after the last tag, on line 7 of the shipped file.
    const text = exampleText.replace('"grasp-rank"]', '"grasp-rank",]');
    const lines = text.split('\n');
    const line = lines.findIndex((l) => l.includes('"grasp-rank",]')) + 1;
    const column = lines[line - 1].indexOf(']') + 1;
    const { status, body } = await importContent(text, 'broken.json');
    expect(status).toBe(400);
    expect(body.error).toMatchObject({ stage: 'syntax', path: 'content' });
    expect(body.error.issues[0]).toMatchObject({ line, column });
    expect(body.error.message).toContain(`line ${line}, column ${column}`);
  });

  it('locates an unclosed object at the end of the file', async () => {
    const { status, body } = await importContent('{\n  "format": "slipless.sheet"\n');
    expect(status).toBe(400);
    expect(body.error.issues[0]).toMatchObject({ line: 3, column: 1 });
  });

  it('locates a schema error by its field path and line', async () => {
    const bad = structuredClone(example);
    bad.hand.fingers[1].joints[0].axis = [0, 0, 0];
    const text = JSON.stringify(bad, null, 2);
    const { status, body } = await importContent(text);
    expect(status).toBe(400);
    expect(body.error.stage).toBe('document');
    expect(body.error.path).toBe('content.hand.fingers[1].joints[0].axis');
    const issue = body.error.issues[0];
    expect(issue).toMatchObject({ path: 'hand.fingers[1].joints[0].axis', message: 'axis must not be the zero vector' });
    // Independently: the second `"axis"` key in the pretty-printed text is finger 1's first joint.
    const lines = text.split('\n');
    const axisLines = lines.map((l, i) => (l.includes('"axis"') ? i + 1 : 0)).filter(Boolean);
    expect(issue.line).toBe(axisLines[3]);
    expect(issue.column).toBe(lines[issue.line - 1].indexOf('"axis"') + 1);
  });

  it('refuses a non-unit quaternion at its path', async () => {
    const bad = structuredClone(example);
    bad.object.pose.orientation = { w: 1, x: 0.1, y: 0, z: 0 };
    const { status, body } = await importContent(JSON.stringify(bad, null, 2));
    expect(status).toBe(400);
    expect(body.error.issues[0].path).toBe('object.pose.orientation');
    expect(body.error.issues[0].message).toMatch(/not a unit quaternion/);
    expect(body.error.issues[0].line).toBeGreaterThan(1);
  });

  it('reports at most MAX_SHEET_ISSUES problems of a file with thousands, located like the others', async () => {
    const bad: Record<string, unknown> = structuredClone(example);
    for (let i = 0; i < 5_000; i++) bad[`extra${i}`] = i;
    const { status, body } = await importContent(JSON.stringify(bad, null, 2));
    expect(status).toBe(400);
    expect(body.error.issues).toHaveLength(MAX_SHEET_ISSUES);
    expect(body.error.issues[0]).toMatchObject({ path: 'extra0', message: 'unknown field "extra0"', line: expect.any(Number) });
    const created = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Many', document: bad }, identity: people.editor }));
    expect((await created.json()).error.issues).toHaveLength(MAX_SHEET_ISSUES);
  });

  it('reports an unknown field at the field itself', async () => {
    const bad = { ...structuredClone(example), colour: 'teal' };
    const { body } = await importContent(JSON.stringify(bad, null, 2));
    const issue = body.error.issues.find((i: { path: string }) => i.path === 'colour');
    expect(issue).toMatchObject({ message: 'unknown field "colour"', column: 3 });
  });

  it('accepts a multipart upload and refuses viewers (403) and other teams (404)', async () => {
    const form = new FormData();
    form.set('teamId', teamId);
    form.set('file', new File([exampleText], 'peg-upload.json', { type: 'application/json' }));
    const context = apiContext({ method: 'POST', identity: people.owner });
    const request = new Request('http://127.0.0.1/api/sheets/import', { method: 'POST', body: form });
    const response = await importRoute.POST({ ...context, request } as typeof context);
    expect(response.status).toBe(201);
    expect((await importContent(exampleText, 'x.json', people.viewer)).status).toBe(403);
    expect((await importContent(exampleText, 'x.json', outsider)).status).toBe(404);
    expect((await importRoute.POST(apiContext({ method: 'POST', body: { teamId, content: exampleText } }))).status).toBe(401);
  });
});

describe('deeply nested JSON and complex values', () => {
  const DEPTH = 10_000;
  const deepArrays = `${'['.repeat(DEPTH)}${']'.repeat(DEPTH)}`;
  const deepObjects = `${'{"a":'.repeat(DEPTH)}1${'}'.repeat(DEPTH)}`;
  const deepMixed = `${'[{"a":'.repeat(DEPTH / 2)}1${'}]'.repeat(DEPTH / 2)}`;

  /** Calls a route with a raw JSON body text, as a client could send it. */
  async function postText(handler: typeof sheetsRoute.POST, text: string, params: Record<string, string> = {}) {
    const context = apiContext({ method: 'POST', params, identity: people.editor });
    const request = new Request('http://127.0.0.1/api/sheets', { method: 'POST', headers: { 'content-type': 'application/json' }, body: text });
    const response = await handler({ ...context, request } as typeof context);
    return { status: response.status, body: await response.json() };
  }

  /** A 400 whose message is not empty and whose path starts at `path`. */
  function expectLocated(result: { status: number; body: { error?: { message?: string; path?: string } } }, path: string) {
    expect(result.status).toBe(400);
    expect(result.body.error?.message).toEqual(expect.any(String));
    expect(result.body.error?.message?.length).toBeGreaterThan(0);
    expect(result.body.error?.path === path || result.body.error?.path?.startsWith(`${path}.`)).toBe(true);
  }

  it.each([
    ['arrays', deepArrays],
    ['objects', deepObjects],
    ['arrays and objects', deepMixed],
  ])('refuses an imported file of %s nested 10,000 deep, at the content', async (_kind, text) => {
    expectLocated(await importContent(text, 'deep.json'), 'content');
    expectLocated(await importContent(`{"format": "slipless.sheet", "tags": ${text}}`, 'deep.json'), 'content');
    expectLocated(await importContent(`{"format": "slipless.sheet", "tags": ${text}`, 'deep.json'), 'content');
  });

  it.each([
    ['arrays', deepArrays],
    ['objects', deepObjects],
  ])('refuses a request body of %s nested 10,000 deep on create and save', async (_kind, text) => {
    expectLocated(await postText(sheetsRoute.POST, text), text.startsWith('[') ? '(body)' : 'a');
    expectLocated(await postText(sheetsRoute.POST, `{"teamId": ${JSON.stringify(teamId)}, "title": "Deep", "document": ${text}}`), 'document');
    const inDocument = `{"teamId": ${JSON.stringify(teamId)}, "title": "Deep", "document": ${exampleText.replace('"tags": [', `"tags": [${text}, `)}}`;
    expectLocated(await postText(sheetsRoute.POST, inDocument), 'document');
    const sheetId = await createSheet(people.editor);
    expectLocated(await postText(revisionsRoute.POST, `{"baseRevision": 1, "document": ${text}}`, { sheetId }), 'document');
    expectLocated(await postText(revisionsRoute.POST, text, { sheetId }), text.startsWith('[') ? '(body)' : 'a');
  });

  it('refuses a file or body of more values than a sheet can hold before parsing it, at the field that holds them', async () => {
    // Parsing, validating and locating issues cost time per value while the event loop waits.
    const unknownFields = Object.fromEntries(Array.from({ length: MAX_JSON_VALUES + 1 }, (_, i) => [`extra${i}`, i]));
    const padded = JSON.stringify({ ...example, ...unknownFields });
    const imported = await importContent(padded, 'padded.json');
    expectLocated(imported, 'content');
    expect((imported.body as { error: { message: string } }).error.message).toMatch(/more than 10,000 values/);
    expectLocated(await postText(sheetsRoute.POST, `{"teamId": ${JSON.stringify(teamId)}, "title": "Padded", "document": ${padded}}`), 'document');
    expect((await importContent(JSON.stringify(largestSheet(example)), 'largest.json')).status).toBe(201);
  });

  it.each(['sqrt(-1) mm', 'asin(2) * 1 mm', '(-1 mm^2)^0.5', '1e400 mm'])('refuses the quantity %s with a message at its field', async (radius) => {
    const bad = structuredClone(example);
    bad.hand.fingers[0].roller.radius = radius;
    const created = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Complex', document: bad }, identity: people.editor }));
    expectLocated({ status: created.status, body: await created.json() }, 'document.hand.fingers[0].roller.radius');
    const imported = await importContent(JSON.stringify(bad, null, 2));
    expectLocated(imported, 'content.hand.fingers[0].roller.radius');
  });
});
