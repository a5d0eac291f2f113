import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createClient } from '@libsql/client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort, tempDatabaseUrl } from '../helpers/temp';
import { startApp, type AppProcess } from './app-process';
import { cookieHeader, keepCookies, signInOverHttp } from './http-session';

/*
 * The built server over HTTP (no browser): what only shows once the app runs behind its own
 * node:http edge — body limits while streaming, client addresses, the public origin, the single
 * origin check, and the headers on every kind of response.
 */

const PUBLIC = 'https://slipless.example.org';
const OWNER = 'owner@tarnwhistle.example';
const PASSWORD = 'slipless-demo';
const exampleDocument = readFileSync(join(process.cwd(), 'content', 'sheets', 'line4-peg-tilt.json'), 'utf8');

/** A started app with its database URL, so a test can read what it stored. */
interface App extends AppProcess {
  databaseUrl: string;
}

async function start(env: NodeJS.ProcessEnv = {}): Promise<App> {
  const databaseUrl = tempDatabaseUrl();
  const app = await startApp({ port: await freePort(), databaseUrl, env: { ...process.env, ...env } });
  return { ...app, databaseUrl };
}

/** Rows from the app's own database file (the app keeps running; SQLite in WAL mode allows the reader). */
async function query<T>(app: App, sql: string, args: (string | number)[] = []): Promise<T[]> {
  const client = createClient({ url: app.databaseUrl });
  try {
    return (await client.execute({ sql, args })).rows as unknown as T[];
  } finally {
    client.close();
  }
}

/** Signs in as the demo owner, or with a wrong password as anyone else. */
function signIn(baseUrl: string, origin: string, email = OWNER, headers: Record<string, string> = {}) {
  return signInOverHttp(baseUrl, origin, email, email === OWNER ? PASSWORD : 'not-the-password', headers);
}

async function demoTeamId(app: App): Promise<string> {
  const [team] = await query<{ id: string }>(app, "select id from teams where slug = 'tarnwhistle-cell4'");
  if (!team) throw new Error('no demo team');
  return team.id;
}

async function anySheetId(app: App, teamId: string): Promise<string> {
  const [sheet] = await query<{ id: string }>(app, 'select id from sheets where team_id = ? and deleted_at is null limit 1', [teamId]);
  return sheet.id;
}

/** A multipart body with a sheet file, as a script would upload it. */
function importForm(teamId: string, content: string | Blob, name = 'scripted.json'): FormData {
  const form = new FormData();
  form.set('teamId', teamId);
  form.set('file', content instanceof Blob ? content : new Blob([content], { type: 'application/json' }), name);
  return form;
}

/**
 * A request body that streams `bytes` in 64 KiB chunks without a Content-Length, counting what
 * the server pulled; with `stallAfter` it sends that much and then waits without ending.
 */
function chunkedBody(bytes: number, stallAfter = Infinity) {
  const chunk = new Uint8Array(64 * 1024).fill(0x61);
  const state = { pulled: 0 };
  const stream = new ReadableStream<Uint8Array>(
    {
      pull(controller) {
        if (state.pulled >= stallAfter) return new Promise<void>(() => {});
        if (state.pulled >= bytes) return controller.close();
        state.pulled += chunk.byteLength;
        controller.enqueue(chunk);
      },
    },
    { highWaterMark: 0 },
  );
  return { stream, state };
}

const BASELINE_HEADERS = ['x-content-type-options', 'x-frame-options', 'referrer-policy', 'cross-origin-opener-policy', 'permissions-policy'];

function expectBaselineHeaders(response: Response): void {
  for (const name of BASELINE_HEADERS) expect(response.headers.get(name), `${name} on ${response.url} (${response.status})`).toBeTruthy();
}

describe('the built server on loopback, default settings', () => {
  let app: App;
  let teamId: string;
  let owner: Map<string, string>;
  let token: string;

  beforeAll(async () => {
    app = await start();
    teamId = await demoTeamId(app);
    owner = (await signIn(app.baseUrl, app.baseUrl)).jar;
    const created = await fetch(`${app.baseUrl}/api/tokens`, {
      method: 'POST',
      headers: { origin: app.baseUrl, cookie: cookieHeader(owner), 'content-type': 'application/json' },
      body: JSON.stringify({ teamId, name: 'edge script', role: 'owner' }),
    });
    expect(created.status).toBe(201);
    token = ((await created.json()) as { token: string }).token;
  });

  afterAll(async () => {
    await app?.stop();
  });

  describe('bearer tokens pass the one origin check (no Origin header, as scripts send)', () => {
    it('deletes a sheet with a bodiless DELETE', async () => {
      const sheetId = await anySheetId(app, teamId);
      const response = await fetch(`${app.baseUrl}/api/sheets/${sheetId}`, { method: 'DELETE', headers: { authorization: `Bearer ${token}` } });
      expect(response.status).toBe(204);
    });

    it('imports a sheet file as multipart form data', async () => {
      const response = await fetch(`${app.baseUrl}/api/sheets/import`, { method: 'POST', headers: { authorization: `Bearer ${token}` }, body: importForm(teamId, exampleDocument) });
      expect(response.status).toBe(201);
    });

    it('still refuses a cross-site write carrying the session cookie, with the security headers', async () => {
      const response = await fetch(`${app.baseUrl}/api/sheets`, {
        method: 'POST',
        headers: { origin: 'http://evil.example', cookie: cookieHeader(owner), 'content-type': 'application/json' },
        body: JSON.stringify({ teamId, title: 'Cross-site', document: JSON.parse(exampleDocument) }),
      });
      expect(response.status).toBe(403);
      expectBaselineHeaders(response);
    });
  });

  describe('request bodies', () => {
    it('answers an unauthenticated import with 401 without reading its body', async () => {
      // The upload stalls after 1 MiB of a declared 50 MB: only an answer that does not wait for the body arrives.
      const { stream } = chunkedBody(50 * 1024 * 1024, 1024 * 1024);
      const abort = new AbortController();
      const response = await fetch(`${app.baseUrl}/api/sheets/import`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: stream,
        duplex: 'half',
        signal: abort.signal,
      } as RequestInit);
      expect(response.status).toBe(401);
      abort.abort();
    });

    it('refuses a declared Content-Length over the import limit with 413 naming the limit', async () => {
      const response = await fetch(`${app.baseUrl}/api/sheets/import`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}` },
        body: importForm(teamId, new Blob([new Uint8Array(3 * 1024 * 1024).fill(0x20)]), 'huge.json'),
      });
      expect(response.status).toBe(413);
      expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/2 MiB/);
    });

    it('stops reading a chunked sheet body past its limit and answers 413', async () => {
      const sheetId = await anySheetId(app, teamId);
      const { stream, state } = chunkedBody(64 * 1024 * 1024);
      const response = await fetch(`${app.baseUrl}/api/sheets/${sheetId}/revisions`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
        body: stream,
        duplex: 'half',
      } as RequestInit);
      expect(response.status).toBe(413);
      expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/1 MiB/);
      // The 1 MiB the server read plus what the loopback socket buffers took while the answer was on its way (several MiB on a busy machine).
      expect(state.pulled).toBeLessThan(24 * 1024 * 1024);
    });

    it('limits Auth.js posts too', async () => {
      const response = await fetch(`${app.baseUrl}/api/auth/callback/credentials`, {
        method: 'POST',
        headers: { origin: app.baseUrl, 'content-type': 'application/x-www-form-urlencoded' },
        body: `email=${'a'.repeat(200 * 1024)}`,
      });
      expect(response.status).toBe(413);
    });
  });

  describe('client addresses', () => {
    it('ignores X-Forwarded-For from a peer that is not a configured proxy', async () => {
      await signIn(app.baseUrl, app.baseUrl, 'nobody-edge@slipless.example', { 'x-forwarded-for': '203.0.113.77' });
      const rows = await query<{ address: string }>(app, "select address from audit_events where action = 'auth.sign_in_failed' and detail like '%nobody-edge%'");
      expect(rows.map((r) => r.address)).toEqual(['127.0.0.1']);
    });
  });

  describe('headers on every response', () => {
    it('sends the security headers with static files, unknown paths and middleware refusals', async () => {
      const responses = await Promise.all([
        fetch(`${app.baseUrl}/favicon.svg`),
        fetch(`${app.baseUrl}/no-such-page`),
        fetch(`${app.baseUrl}/api/sheets/import`, { method: 'POST', headers: { authorization: 'Bearer slp_unknown' } }),
        fetch(`${app.baseUrl}/api/me`, { method: 'DELETE', headers: { origin: 'http://evil.example' } }),
      ]);
      expect(responses.map((r) => r.status)).toEqual([200, 404, 401, 403]);
      responses.forEach(expectBaselineHeaders);
    });

    it('allows exactly the inline scripts Astro itself renders, whatever a page contains', async () => {
      const page = await fetch(`${app.baseUrl}/sheets`, { headers: { cookie: cookieHeader(owner) } });
      const html = await page.text();
      const policy = page.headers.get('content-security-policy') ?? '';
      const inline = [...html.matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/gi)].map((m) => m[1]).filter((s) => s.trim());
      expect(inline.length).toBeGreaterThan(0);
      for (const script of inline) expect(policy).toContain(`'sha256-${createHash('sha256').update(script).digest('base64')}'`);
      const other = await fetch(`${app.baseUrl}/sign-in`);
      expect(other.headers.get('content-security-policy')).toBe(policy);
    });

    it('marks answers for a signed-in caller as not to be stored', async () => {
      for (const headers of [{ cookie: cookieHeader(owner) }, { authorization: `Bearer ${token}` }] as Record<string, string>[]) {
        const response = await fetch(`${app.baseUrl}/api/sheets?team=${teamId}`, { headers });
        expect(response.status).toBe(200);
        expect(response.headers.get('cache-control')).toBe('no-store');
      }
    });

    it('sends no Strict-Transport-Security over plain HTTP, even when a client claims HTTPS', async () => {
      const response = await fetch(`${app.baseUrl}/api/health`, { headers: { 'x-forwarded-proto': 'https' } });
      expect(response.headers.get('strict-transport-security')).toBeNull();
    });
  });
});

describe('the built server behind a configured proxy with a public origin', () => {
  let app: App;

  beforeAll(async () => {
    app = await start({ PUBLIC_ORIGIN: PUBLIC, TRUSTED_PROXIES: '127.0.0.1/32, 10.0.0.0/8' });
  });

  afterAll(async () => {
    await app?.stop();
  });

  it('takes the client address from X-Forwarded-For, skipping trusted hops', async () => {
    await signIn(app.baseUrl, PUBLIC, 'nobody-proxied@slipless.example', { 'x-forwarded-for': '198.51.100.1, 203.0.113.78, 10.1.2.3' });
    const rows = await query<{ address: string }>(app, "select address from audit_events where action = 'auth.sign_in_failed' and detail like '%nobody-proxied%'");
    expect(rows.map((r) => r.address)).toEqual(['203.0.113.78']);
  });

  it('accepts a same-origin sign-in from the public origin and refuses another origin', async () => {
    const accepted = await signIn(app.baseUrl, PUBLIC);
    expect(accepted.response.status).toBe(200);
    expect(((await accepted.response.json()) as { url: string }).url).toBe(`${PUBLIC}/sheets`);
    expect([...accepted.jar.keys()].some((name) => name.endsWith('authjs.session-token'))).toBe(true);
    const me = await fetch(`${app.baseUrl}/api/me`, { headers: { cookie: cookieHeader(accepted.jar) } });
    expect(me.status).toBe(200);

    const refused = await fetch(`${app.baseUrl}/api/me/team`, {
      method: 'PUT',
      headers: { origin: app.baseUrl, cookie: cookieHeader(accepted.jar), 'content-type': 'application/json' },
      body: JSON.stringify({ teamId: await demoTeamId(app) }),
    });
    expect(refused.status).toBe(403);
  });

  it('puts the public origin into mailed links: password reset, invitation and Auth.js sign-in link', async () => {
    const reset = await fetch(`${app.baseUrl}/api/account/password-reset`, {
      method: 'POST',
      headers: { origin: PUBLIC, 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'viewer@tarnwhistle.example' }),
    });
    expect(reset.status).toBe(202);
    const { jar } = await signIn(app.baseUrl, PUBLIC);
    const invited = await fetch(`${app.baseUrl}/api/teams/${await demoTeamId(app)}/invitations`, {
      method: 'POST',
      headers: { origin: PUBLIC, cookie: cookieHeader(jar), 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'edge-invitee@slipless.example', role: 'viewer' }),
    });
    expect(invited.status).toBe(201);
    const csrf = await fetch(`${app.baseUrl}/api/auth/csrf`);
    const csrfJar = new Map<string, string>();
    keepCookies(csrf, csrfJar);
    const emailLink = await fetch(`${app.baseUrl}/api/auth/signin/nodemailer`, {
      method: 'POST',
      redirect: 'manual',
      headers: { origin: PUBLIC, cookie: cookieHeader(csrfJar), 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email: 'reviewer@tarnwhistle.example', csrfToken: ((await csrf.json()) as { csrfToken: string }).csrfToken }),
    });
    expect(emailLink.status).toBe(302);
    const recipients = "('viewer@tarnwhistle.example', 'edge-invitee@slipless.example', 'reviewer@tarnwhistle.example')";
    let mails: { to: string; text: string }[] = [];
    for (let tries = 0; tries < 50 && mails.length < 3; tries++) {
      mails = await query(app, `select "to", text from mail_outbox where "to" in ${recipients}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const links = mails.map((mail) => mail.text.match(/https?:\/\/\S+/)?.[0] ?? '');
    expect(links).toHaveLength(3);
    for (const link of links) expect(link.startsWith(`${PUBLIC}/`), link).toBe(true);
  });

  it('sends Strict-Transport-Security on every response for an https public origin', async () => {
    for (const path of ['/favicon.svg', '/api/health', '/no-such-page']) {
      const response = await fetch(`${app.baseUrl}${path}`);
      expect(response.headers.get('strict-transport-security'), path).toMatch(/max-age=\d+/);
    }
  });
});

describe('the built server behind a configured proxy without a public origin', () => {
  let app: App;

  beforeAll(async () => {
    app = await start({ TRUSTED_PROXIES: '127.0.0.1' });
  });

  afterAll(async () => {
    await app?.stop();
  });

  it('sends Strict-Transport-Security when the proxy says the request came over HTTPS', async () => {
    const viaHttps = await fetch(`${app.baseUrl}/favicon.svg`, { headers: { 'x-forwarded-proto': 'https' } });
    expect(viaHttps.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
    const viaHttp = await fetch(`${app.baseUrl}/favicon.svg`, { headers: { 'x-forwarded-proto': 'http' } });
    expect(viaHttp.headers.get('strict-transport-security')).toBeNull();
  });
});
