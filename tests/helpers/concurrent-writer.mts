// Child process for the two-process durability test: creates sheets concurrently on one
// database file and prints the id of every sheet whose save was acknowledged.
import { openDatabase } from '../../src/db/index.ts';
import { createTestSheet } from './test-sheets.ts';

const [url, teamId, countText, label] = process.argv.slice(2);
const database = await openDatabase(url);
const results = await Promise.allSettled(
  Array.from({ length: Number(countText) }, (_, i) =>
    createTestSheet(database, teamId, `${label}-${i}`),
  ),
);
const acknowledged = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value.sheetId] : []));
const failures = results.flatMap((r) => (r.status === 'rejected' ? [String(r.reason)] : []));
process.stdout.write(JSON.stringify({ acknowledged, failures }));
database.close();
