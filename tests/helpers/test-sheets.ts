import { readFileSync } from 'node:fs';
import type { Database } from '../../src/db';
import { createSheet } from '../../src/lib/server/sheets';

/** A valid sheet document (the peg tilt example); tests that only need some sheet store this one. */
export const exampleSheetDocument: unknown = JSON.parse(readFileSync(new URL('../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8'));

/** Creates a sheet named `title` from a valid document as the system (no acting user); throws when the service refuses it. */
export async function createTestSheet(database: Database, teamId: string, title: string, document: unknown = exampleSheetDocument): Promise<{ sheetId: string }> {
  const created = await createSheet(database, { teamId, title, document, actor: { userId: null } });
  if (!created.ok) throw new Error(`createSheet refused the test sheet: ${created.error.message}`);
  return created.value;
}
