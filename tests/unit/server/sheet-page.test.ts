import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Identity } from '../../../src/lib/server/access';
import { getDatabase } from '../../../src/lib/server/database';
import { loadSheetPage } from '../../../src/lib/server/sheet-page';
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
