import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Identity } from '../../../src/lib/server/access';
import { getDatabase } from '../../../src/lib/server/database';
import { readFileSync } from 'node:fs';
import { parseKeepingNonFinite, stringifyKeepingNonFinite } from '../../../src/lib/contract';
import { evaluateForPage, loadSheetPage } from '../../../src/lib/server/sheet-page';
import { computeSheet, type ComputeReply } from '../../../src/workers/compute-protocol';
import { deleteSheet, findSheet } from '../../../src/lib/server/sheets';
import { demoIdentity, demoTeamId } from '../../helpers/api-context';
import { createTestSheet } from '../../helpers/test-sheets';

let editor: Identity;
let sheetId: string;

beforeAll(async () => {
  editor = await demoIdentity('editor');
  ({ sheetId } = await createTestSheet(await getDatabase(), await demoTeamId(), 'Sheet page revision query'));
});

afterAll(async () => {
  // Other tests read the demo team's seeded sheets only.
  await deleteSheet(await getDatabase(), sheetId, { userId: null });
});

describe('loadSheetPage', () => {
  async function load(revision: string | null) {
    const database = await getDatabase();
    const sheet = await findSheet(database, sheetId);
    if (!sheet) throw new Error('test sheet missing');
    return loadSheetPage(database, editor, sheet, revision);
  }

  it('opens the latest revision without a query and a named one with plain digits', async () => {
    expect(await load(null)).toMatchObject({ ok: true, value: { revision: { number: 1 } } });
    expect(await load('1')).toMatchObject({ ok: true, value: { revision: { number: 1 } } });
  });

  it.each(['0x1', '1e0', '1.0', '0', '-1', ' 1', '<script>'])('reads the revision %j as no revision, not as a number', async (revision) => {
    expect(await load(revision)).toMatchObject({ ok: false, error: { kind: 'not-found' } });
  });
});

describe('evaluateForPage (the first results, drawn with the page)', () => {
  const sheet = () => JSON.parse(readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8'));

  it('is the compute worker reply without the derivation, as id 0', () => {
    const page = parseKeepingNonFinite<ComputeReply>(evaluateForPage(sheet()));
    const worker = computeSheet({ type: 'compute', id: 0, document: sheet(), derive: false });
    if (page.type !== 'computed' || worker.type !== 'computed') throw new Error('expected replies');
    expect({ ...page, elapsedMs: 0 }).toEqual({ ...worker, elapsedMs: 0 });
    expect(page.ok).toBe(true);
    expect(page.ok && page.derivation).toBeUndefined();
  });

  it('reports the issues of a document that does not read, with its readings', () => {
    const doc = sheet();
    doc.hand.fingers[0].roller.radius = '12 deg';
    const page = parseKeepingNonFinite<ComputeReply>(evaluateForPage(doc));
    expect(page).toMatchObject({ type: 'computed', id: 0, ok: false, issues: [{ path: 'hand.fingers[0].roller.radius', message: 'expected a length, got 12 deg' }] });
    // 12 deg = 12 pi/180 rad (SI brochure Table 8).
    if (page.type === 'computed') expect(page.readings.fields['hand.fingers[0].roller.radius']).toEqual({ text: '12 deg', kind: 'angle', value: expect.closeTo((12 * Math.PI) / 180, 15) });
  });
});

describe('JSON keeping non-finite numbers', () => {
  it('brings NaN, both infinities and -0 back, which plain JSON turns into null and 0 (ECMA-404 has no such numbers)', () => {
    const value = { latitude: NaN, condition: [Infinity, -Infinity, 1.5], nested: { zero: -0, small: -0.25, text: 'NaN', none: null } };
    expect(JSON.parse(JSON.stringify(value))).toEqual({ latitude: null, condition: [null, null, 1.5], nested: { zero: 0, small: -0.25, text: 'NaN', none: null } });
    expect(parseKeepingNonFinite(stringifyKeepingNonFinite(value))).toEqual(value);
  });
});
