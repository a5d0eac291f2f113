import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { matrixResults, sheetRevisions } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import { computeMatrixResult, getMatrixResult } from '../../../src/lib/server/matrix-results';
import { runMatrix } from '../../../src/lib/sheet/matrix';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { GET, POST } from '../../../src/pages/api/sheets/[sheetId]/revisions/[revision]/matrix';
import { callRoute, demoIdentity, demoTeamId } from '../../helpers/api-context';
import { createTestSheet, exampleSheetDocument } from '../../helpers/test-sheets';

const document = {
  ...(exampleSheetDocument as Record<string, unknown>),
  matrix: {
    targets: [{ orientation: { axis: [1, 0, 0], angle: '10 deg' }, group: 'tilt' }],
    generators: [{ kind: 'random', count: 2, seed: 9 }],
  },
};

async function matrixSheet() {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  const { sheetId } = await createTestSheet(database, teamId, 'Matrix results test', document);
  return { database, teamId, sheetId };
}

describe('computeMatrixResult', () => {
  it('stores the result the core computes for the revision, and a second run replaces it', async () => {
    const { database, teamId, sheetId } = await matrixSheet();
    const editor = await demoIdentity('editor');
    const first = await computeMatrixResult(database, { id: sheetId, teamId }, 1, { userId: editor.user.id });
    if (!first.ok) throw new Error(first.error.message);
    const parsed = parseSheet(document);
    if (!parsed.ok) throw new Error('document');
    const direct = runMatrix(parsed.doc);
    expect(first.value.result.runs.map((r) => [r.outcome, r.ticks, r.finalError])).toEqual(direct.runs.map((r) => [r.outcome, r.ticks, r.finalError]));
    expect(first.value.result.complete).toBe(true);
    expect(first.value.createdByName).toBe(editor.user.name);
    await computeMatrixResult(database, { id: sheetId, teamId }, 1, { userId: editor.user.id });
    const [revision] = await database.db.select().from(sheetRevisions).where(eq(sheetRevisions.sheetId, sheetId));
    const rows = await database.db.select().from(matrixResults).where(eq(matrixResults.revisionId, revision!.id));
    expect(rows.length).toBe(1);
  });

  it('stores an incomplete result when the time limit has passed, with the runs that finished', async () => {
    const { database, teamId, sheetId } = await matrixSheet();
    const editor = await demoIdentity('editor');
    const stopped = await computeMatrixResult(database, { id: sheetId, teamId }, 1, { userId: editor.user.id }, 0);
    if (!stopped.ok) throw new Error(stopped.error.message);
    expect(stopped.value.result.complete).toBe(false);
    expect(stopped.value.result.runs.length).toBeLessThan(3);
    expect(stopped.value.result.totalRuns).toBe(3);
  });

  it('answers not found for a revision that does not exist, and for one never computed', async () => {
    const { database, teamId, sheetId } = await matrixSheet();
    const editor = await demoIdentity('editor');
    const missing = await computeMatrixResult(database, { id: sheetId, teamId }, 7, { userId: editor.user.id });
    expect(missing.ok ? null : [missing.error.kind, missing.error.path]).toEqual(['not-found', 'revision']);
    const never = await getMatrixResult(database, sheetId, 1);
    expect(never.ok ? null : never.error.kind).toBe('not-found');
  });
});

describe('the matrix route', () => {
  it('names the revision field when the path does not hold a revision number', async () => {
    const { sheetId } = await matrixSheet();
    const identity = await demoIdentity('editor');
    for (const revision of ['abc', '0', '1.5']) {
      const response = await callRoute(GET, { path: `/api/sheets/${sheetId}/revisions/${revision}/matrix`, params: { sheetId, revision }, identity });
      expect(response.status).toBe(400);
      expect((await response.json()).error.path).toBe('revision');
    }
  });

  it('computes with POST (201) and answers the same record with GET (200)', async () => {
    const { database, sheetId } = await matrixSheet();
    const identity = await demoIdentity('editor');
    const spec = { path: `/api/sheets/${sheetId}/revisions/1/matrix`, params: { sheetId, revision: '1' }, identity };
    const posted = await callRoute(POST, { ...spec, method: 'POST' });
    expect(posted.status).toBe(201);
    const got = await callRoute(GET, spec);
    expect(got.status).toBe(200);
    const [postedBody, gotBody] = [await posted.json(), await got.json()];
    expect(gotBody.result).toEqual(postedBody.result);
    expect(gotBody.result.groups.map((g: { group: string }) => g.group)).toEqual(['tilt', 'random, seed 9']);
    const rows = await database.db.select().from(matrixResults).where(eq(matrixResults.createdBy, identity.user.id));
    expect(rows.length).toBeGreaterThan(0);
  });
});
