import { createClient, type Client } from '@libsql/client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort } from '../helpers/temp';
import { SQLD_AVAILABLE, startSqld, type SqldServer } from '../helpers/sqld';
import { startApp, type AppProcess } from './app-process';
import { cookieHeader, keepCookies, signInOverHttp } from './http-session';

const EDITOR = { email: 'editor@tarnwhistle.example', password: 'slipless-demo' };

// Two copies of the built app on two ports, one libSQL server behind both: the way several
// instances run behind a load balancer. Nothing but the database may carry state between them.
describe.skipIf(!SQLD_AVAILABLE)('two app instances on one libSQL server', () => {
  let server: SqldServer;
  let a: AppProcess;
  let b: AppProcess;
  let sql: Client;
  let jar: Map<string, string>;

  beforeAll(async () => {
    server = await startSqld();
    // One shared secret, as the README asks of every instance; A migrates and seeds first, B finds the data in place.
    const env = { ...process.env, AUTH_SECRET: 'two-instance-test-secret-0123456789abcdef' };
    a = await startApp({ port: await freePort(), databaseUrl: server.url, env });
    b = await startApp({ port: await freePort(), databaseUrl: server.url, env });
    sql = createClient({ url: server.url });
    ({ jar } = await signInOverHttp(a.baseUrl, a.baseUrl, EDITOR.email, EDITOR.password));
  }, 180_000);

  afterAll(async () => {
    sql?.close();
    await a?.stop();
    await b?.stop();
    await server?.stop();
  });

  /** A JSON request with the session cookie, its Origin header naming the instance it goes to. */
  const call = (app: AppProcess, path: string, init: { method?: string; body?: unknown } = {}) =>
    fetch(`${app.baseUrl}${path}`, {
      method: init.method ?? 'GET',
      headers: { origin: app.baseUrl, cookie: cookieHeader(jar), 'content-type': 'application/json' },
      body: init.body === undefined ? undefined : JSON.stringify(init.body),
    });

  async function firstSheet(app: AppProcess) {
    const list = (await (await call(app, '/api/sheets')).json()) as { items: { id: string }[] };
    const detail = (await (await call(app, `/api/sheets/${list.items[0].id}`)).json()) as {
      sheet: { id: string; latestRevision: number };
      revision: { inputs: unknown };
    };
    return detail;
  }

  it('accepts a session cookie made by A on B', async () => {
    const onB = await call(b, '/api/me');
    expect(onB.status).toBe(200);
    expect(await onB.json()).toMatchObject({ via: 'session', user: { email: EDITOR.email } });
  });

  it('keeps every save made through either instance, numbered without gap or duplicate', async () => {
    const { sheet, revision } = await firstSheet(a);
    let base = sheet.latestRevision;
    const messages: string[] = [];
    for (let i = 0; i < 12; i++) {
      const app = i % 2 ? b : a;
      const message = `two-instance save ${i} via ${i % 2 ? 'B' : 'A'}`;
      const saved = await call(app, `/api/sheets/${sheet.id}/revisions`, { method: 'POST', body: { baseRevision: base, document: revision.inputs, message } });
      expect(saved.status, message).toBe(201);
      const { revision: number } = (await saved.json()) as { revision: number };
      expect(number).toBe(base + 1);
      base = number;
      messages.push(message);
    }
    // Read back through the other instance and straight from the server.
    const listed = (await (await call(b, `/api/sheets/${sheet.id}/revisions?pageSize=100`)).json()) as { items: { number: number; message: string }[] };
    for (const message of messages) expect(listed.items.map((r) => r.message)).toContain(message);
    const rows = await sql.execute({ sql: 'SELECT number FROM sheet_revisions WHERE sheet_id = ? ORDER BY number', args: [sheet.id] });
    const numbers = rows.rows.map((r) => Number(r.number));
    expect(numbers).toEqual(Array.from({ length: numbers.length }, (_, i) => i + 1));
    expect(numbers.at(-1)).toBe(base);
  });

  it('detects a conflict on the same base revision sent to A and B at once', async () => {
    const { sheet, revision } = await firstSheet(b);
    const save = (app: AppProcess, who: string) =>
      call(app, `/api/sheets/${sheet.id}/revisions`, { method: 'POST', body: { baseRevision: sheet.latestRevision, document: revision.inputs, message: `race ${who}` } });
    for (let round = 0; round < 5; round++) {
      const { sheet: current } = await firstSheet(a);
      sheet.latestRevision = current.latestRevision;
      const statuses = (await Promise.all([save(a, `A${round}`), save(b, `B${round}`)])).map((r) => r.status).sort();
      expect(statuses, `round ${round}`).toEqual([201, 409]);
    }
  });

  it('counts a rate limit once over both instances (sign-in link mails to one address: 3 back to back)', async () => {
    const recipient = 'reviewer@tarnwhistle.example';
    const requestLink = async (app: AppProcess) => {
      const csrfJar = new Map<string, string>();
      const csrf = await fetch(`${app.baseUrl}/api/auth/csrf`);
      keepCookies(csrf, csrfJar);
      const { csrfToken } = (await csrf.json()) as { csrfToken: string };
      return fetch(`${app.baseUrl}/api/auth/signin/nodemailer`, {
        method: 'POST',
        redirect: 'manual',
        headers: { origin: app.baseUrl, cookie: cookieHeader(csrfJar), 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ email: recipient, csrfToken }),
      });
    };
    for (const app of [a, b, a, b, a, b]) await requestLink(app);
    const queued = async () => Number((await sql.execute({ sql: 'SELECT count(*) AS n FROM mail_outbox WHERE "to" = ?', args: [recipient] })).rows[0].n);
    // Mail is queued in the database by each instance's write queue: wait for the three that must come (a busy machine can take seconds) ...
    const until = Date.now() + 20_000;
    while ((await queued()) < 3 && Date.now() < until) await new Promise((r) => setTimeout(r, 200));
    // ... and a moment more for any that should not.
    await new Promise((r) => setTimeout(r, 1_000));
    // Per-instance counters would have let 3 through on each (6); shared counters let 3 in all.
    expect(await queued()).toBe(3);
  });
});
