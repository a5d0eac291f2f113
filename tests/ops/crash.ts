/**
 * `npm run test:crash`: five rounds of a stream of saves (writers on sheets of their own), a
 * SIGKILL of the app mid-stream, a restart on the same database, then checks: SQLite's integrity
 * check passes, every save the app acknowledged (201) is there, and each sheet's revision numbers
 * run 1..n without gap or duplicate. Exits non-zero on any failure. DATABASE_URL may name a
 * libSQL server (http://...) instead of the default fresh SQLite file.
 */
import { createClient } from '@libsql/client';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from '../e2e/app-process';
import { createSheets, editorSession } from './session';

const ROUNDS = 5;
const WRITERS = 10;

const databaseUrl = process.env.DATABASE_URL ?? tempDatabaseUrl();
const port = await freePort();
const acknowledged = new Map<string, Set<string>>();
const problems: string[] = [];
let app: AppProcess | undefined;

const start = () => startApp({ port, databaseUrl, env: { ...process.env, AUTH_SECRET: 'crash-script-secret-0123456789abcdef' }, singleProcess: true });

try {
  app = await start();
  const first = await editorSession(app.baseUrl);
  const sheetIds = await createSheets(app.baseUrl, first, WRITERS, 'crash');
  for (const id of sheetIds) acknowledged.set(id, new Set(['Created']));

  for (let round = 1; round <= ROUNDS; round++) {
    const session = await editorSession(app.baseUrl);
    let running = true;
    const writer = async (sheetId: string) => {
      let base: number;
      try {
        const latest = (await (await fetch(`${app!.baseUrl}/api/sheets/${sheetId}`, { headers: session.headers })).json()) as { sheet: { latestRevision: number } };
        base = latest.sheet.latestRevision;
      } catch {
        return; // killed before this writer began
      }
      for (let i = 0; running; i++) {
        const message = `round ${round} save ${i}`;
        try {
          const response = await fetch(`${app!.baseUrl}/api/sheets/${sheetId}/revisions`, {
            method: 'POST',
            headers: session.headers,
            body: JSON.stringify({ baseRevision: base, document: session.document, message }),
          });
          if (response.status !== 201) {
            problems.push(`round ${round}: ${sheetId} answered ${response.status} to ${message}`);
            return;
          }
          base = ((await response.json()) as { revision: number }).revision;
          acknowledged.get(sheetId)!.add(message);
        } catch {
          return; // the kill cut this request off; it was never acknowledged
        }
      }
    };
    const writers = sheetIds.map(writer);
    // A few seconds of saves, cut at a random moment.
    await new Promise((r) => setTimeout(r, 3_000 + Math.random() * 3_000));
    app.signal('SIGKILL');
    running = false;
    await Promise.all(writers);
    await app.exited;
    app = await start();

    // Checked through a separate client, as an operator would after a crash.
    const db = createClient({ url: databaseUrl });
    try {
      if (databaseUrl.startsWith('file:')) {
        const integrity = String((await db.execute('PRAGMA integrity_check')).rows[0][0]);
        if (integrity !== 'ok') problems.push(`round ${round}: integrity_check says ${integrity}`);
      }
      let saves = 0;
      for (const sheetId of sheetIds) {
        const rows = (await db.execute({ sql: 'SELECT number, message FROM sheet_revisions WHERE sheet_id = ? ORDER BY number', args: [sheetId] })).rows;
        const numbers = rows.map((r) => Number(r.number));
        if (numbers.some((n, i) => n !== i + 1)) problems.push(`round ${round}: ${sheetId} has revision numbers ${numbers.join(',')}`);
        const stored = new Set(rows.map((r) => String(r.message)));
        for (const message of acknowledged.get(sheetId)!) if (!stored.has(message)) problems.push(`round ${round}: ${sheetId} lost the acknowledged "${message}"`);
        saves += rows.length;
      }
      const acked = [...acknowledged.values()].reduce((sum, s) => sum + s.size, 0);
      console.log(`round ${round}: killed mid-stream; ${acked} acknowledged saves, ${saves} stored revisions, problems so far: ${problems.length}`);
    } finally {
      db.close();
    }
  }
} finally {
  await app?.stop();
}

if (problems.length) {
  console.error(problems.join('\n'));
  process.exitCode = 1;
} else {
  console.log(`crash test: ${ROUNDS} rounds of SIGKILL mid-stream, nothing acknowledged was lost, revision numbers without gaps, integrity ok.`);
}
