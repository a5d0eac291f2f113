import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Identity } from '../../../../src/lib/server/access';
import { BODY_LIMITS } from '../../../../src/lib/server/request-body';
import { deleteSheet } from '../../../../src/lib/server/sheets';
import { createTestSheet } from '../../../helpers/test-sheets';
import { getDatabase } from '../../../../src/lib/server/database';
import { apiContext, callThroughMiddleware, demoIdentity, demoTeamId, ORIGIN, type Handler } from '../../../helpers/api-context';
import { linkIn, startTestOutbox, waitForMail, type TestOutbox } from '../../../helpers/mail';
import * as authRoute from '../../../../src/pages/api/auth/[...auth]';
import * as passwordRoute from '../../../../src/pages/api/account/password';
import * as resetRoute from '../../../../src/pages/api/account/password-reset';
import * as resetConfirmRoute from '../../../../src/pages/api/account/password-reset/confirm';
import * as acceptRoute from '../../../../src/pages/api/invitations/accept';
import * as teamSwitchRoute from '../../../../src/pages/api/me/team';
import * as commentsRoute from '../../../../src/pages/api/sheets/[sheetId]/comments';
import * as forkRoute from '../../../../src/pages/api/sheets/[sheetId]/fork';
import * as reviewsRoute from '../../../../src/pages/api/sheets/[sheetId]/reviews';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import * as importRoute from '../../../../src/pages/api/sheets/import';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as teamRoute from '../../../../src/pages/api/teams/[teamId]/index';
import * as invitationsRoute from '../../../../src/pages/api/teams/[teamId]/invitations';
import * as memberRoute from '../../../../src/pages/api/teams/[teamId]/members/[userId]';
import * as tokensRoute from '../../../../src/pages/api/tokens';

const exampleDocument = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8')) as unknown;
let owner: Identity;
let teamId: string;
let sheetId: string;
let smtp: TestOutbox;

beforeAll(async () => {
  owner = await demoIdentity('owner');
  teamId = await demoTeamId();
  ({ sheetId } = await createTestSheet(await getDatabase(), teamId, 'Request limits scratch sheet', exampleDocument));
  smtp = await startTestOutbox();
});

afterAll(async () => {
  delete process.env.PUBLIC_ORIGIN;
  // The demo team keeps only its seeded sheets, which other tests read.
  await deleteSheet(await getDatabase(), sheetId, { userId: null });
  await smtp?.close();
});

/** A POST-like request whose body is `bytes` long, sent as a declared or a chunked body. */
function sized(method: string, path: string, bytes: number, declared: boolean, contentType = 'application/json'): Request {
  const text = `{"pad":"${'a'.repeat(bytes - 10)}"}`;
  const body = declared ? text : new Blob([text]).stream();
  return new Request(new URL(path, ORIGIN), { method, body, headers: { 'content-type': contentType }, duplex: 'half' } as RequestInit);
}

/** Calls a route with a hand-made request, as the owner unless `anonymous`. */
function call(handler: Handler, request: Request, params: Record<string, string> = {}, anonymous = false): Promise<Response> {
  const context = apiContext({ method: request.method, path: new URL(request.url).pathname, params, identity: anonymous ? null : owner });
  return handler({ ...context, request } as typeof context) as Promise<Response>;
}

interface BodyRoute {
  name: string;
  handler: () => Handler;
  method: string;
  path: () => string;
  params?: () => Record<string, string>;
  limit: number;
  anonymous?: boolean;
}

const ROUTES: BodyRoute[] = [
  { name: 'POST /api/sheets', handler: () => sheetsRoute.POST, method: 'POST', path: () => '/api/sheets', limit: BODY_LIMITS.sheet },
  { name: 'POST /api/sheets/{id}/revisions', handler: () => revisionsRoute.POST, method: 'POST', path: () => `/api/sheets/${sheetId}/revisions`, params: () => ({ sheetId }), limit: BODY_LIMITS.sheet },
  { name: 'POST /api/sheets/import', handler: () => importRoute.POST, method: 'POST', path: () => '/api/sheets/import', limit: BODY_LIMITS.import },
  { name: 'POST /api/sheets/{id}/fork', handler: () => forkRoute.POST, method: 'POST', path: () => `/api/sheets/${sheetId}/fork`, params: () => ({ sheetId }), limit: BODY_LIMITS.form },
  { name: 'POST /api/sheets/{id}/comments', handler: () => commentsRoute.POST, method: 'POST', path: () => `/api/sheets/${sheetId}/comments`, params: () => ({ sheetId }), limit: BODY_LIMITS.form },
  { name: 'POST /api/sheets/{id}/reviews', handler: () => reviewsRoute.POST, method: 'POST', path: () => `/api/sheets/${sheetId}/reviews`, params: () => ({ sheetId }), limit: BODY_LIMITS.form },
  { name: 'PATCH /api/teams/{id}', handler: () => teamRoute.PATCH, method: 'PATCH', path: () => `/api/teams/${teamId}`, params: () => ({ teamId }), limit: BODY_LIMITS.form },
  { name: 'DELETE /api/teams/{id}', handler: () => teamRoute.DELETE, method: 'DELETE', path: () => `/api/teams/${teamId}`, params: () => ({ teamId }), limit: BODY_LIMITS.form },
  { name: 'POST /api/teams/{id}/invitations', handler: () => invitationsRoute.POST, method: 'POST', path: () => `/api/teams/${teamId}/invitations`, params: () => ({ teamId }), limit: BODY_LIMITS.form },
  { name: 'PATCH /api/teams/{id}/members/{userId}', handler: () => memberRoute.PATCH, method: 'PATCH', path: () => `/api/teams/${teamId}/members/${owner.user.id}`, params: () => ({ teamId, userId: owner.user.id }), limit: BODY_LIMITS.form },
  { name: 'POST /api/tokens', handler: () => tokensRoute.POST, method: 'POST', path: () => '/api/tokens', limit: BODY_LIMITS.form },
  { name: 'PUT /api/me/team', handler: () => teamSwitchRoute.PUT, method: 'PUT', path: () => '/api/me/team', limit: BODY_LIMITS.form },
  { name: 'POST /api/account/password', handler: () => passwordRoute.POST, method: 'POST', path: () => '/api/account/password', limit: BODY_LIMITS.form },
  { name: 'POST /api/account/password-reset', handler: () => resetRoute.POST, method: 'POST', path: () => '/api/account/password-reset', limit: BODY_LIMITS.form, anonymous: true },
  { name: 'POST /api/account/password-reset/confirm', handler: () => resetConfirmRoute.POST, method: 'POST', path: () => '/api/account/password-reset/confirm', limit: BODY_LIMITS.form, anonymous: true },
  { name: 'POST /api/invitations/accept', handler: () => acceptRoute.POST, method: 'POST', path: () => '/api/invitations/accept', limit: BODY_LIMITS.form, anonymous: true },
  { name: 'POST /api/auth/callback/credentials', handler: () => authRoute.POST, method: 'POST', path: () => '/api/auth/callback/credentials', params: () => ({ auth: 'callback/credentials' }), limit: BODY_LIMITS.auth, anonymous: true },
];

describe('body limits per route', () => {
  for (const route of ROUTES) {
    it(`${route.name}: 413 one byte past ${route.limit} bytes, declared or chunked`, async () => {
      for (const declared of [true, false]) {
        const response = await call(route.handler(), sized(route.method, route.path(), route.limit + 1, declared), route.params?.(), route.anonymous);
        expect(response.status, declared ? 'declared' : 'chunked').toBe(413);
        expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/(KiB|MiB) this endpoint accepts/);
      }
    });
  }

  it('POST /api/sheets/import counts a multipart upload too', async () => {
    const form = new FormData();
    form.set('teamId', teamId);
    form.set('file', new Blob([new Uint8Array(BODY_LIMITS.import).fill(0x20)]), 'huge.json');
    const request = new Request(new URL('/api/sheets/import', ORIGIN), { method: 'POST', body: form });
    expect((await call(importRoute.POST, request)).status).toBe(413);
  });

  it('POST /api/sheets/import answers 401 to an anonymous caller without reading the body', async () => {
    const request = sized('POST', '/api/sheets/import', 1024, false);
    const response = await call(importRoute.POST, request, {}, true);
    expect(response.status).toBe(401);
    expect(request.bodyUsed).toBe(false);
  });
});

describe('the middleware around every answer', () => {
  const ok: Handler = () => Response.json({ ok: true });

  it('puts the security headers on its own refusals', async () => {
    const refused = await callThroughMiddleware(ok, { method: 'POST', path: '/api/sheets', headers: { origin: 'http://evil.example' } });
    expect(refused.status).toBe(403);
    expect(refused.headers.get('x-content-type-options')).toBe('nosniff');
    const unknownToken = await callThroughMiddleware(ok, { method: 'GET', path: '/api/me', headers: { authorization: 'Bearer slp_unknown' } });
    expect(unknownToken.status).toBe(401);
    expect(unknownToken.headers.get('x-frame-options')).toBe('DENY');
  });

  it('compares Origin with PUBLIC_ORIGIN when it is set', async () => {
    process.env.PUBLIC_ORIGIN = 'https://slipless.example.org';
    try {
      const same = await callThroughMiddleware(ok, { method: 'POST', path: '/api/x', headers: { origin: 'https://slipless.example.org' } });
      expect(same.status).toBe(200);
      expect(same.headers.get('strict-transport-security')).toMatch(/^max-age=/);
      const other = await callThroughMiddleware(ok, { method: 'POST', path: '/api/x', headers: { origin: ORIGIN } });
      expect(other.status).toBe(403);
    } finally {
      delete process.env.PUBLIC_ORIGIN;
    }
  });
});

describe('links in mails', () => {
  it('use PUBLIC_ORIGIN rather than the host the request arrived on', async () => {
    process.env.PUBLIC_ORIGIN = 'https://slipless.example.org';
    try {
      const email = `limits-invitee-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
      const response = await invitationsRoute.POST(apiContext({ method: 'POST', path: `/api/teams/${teamId}/invitations`, params: { teamId }, body: { email, role: 'viewer' }, identity: owner }));
      expect(response.status).toBe(201);
      expect(linkIn((await waitForMail(email)).text, '/invite/').origin).toBe('https://slipless.example.org');
    } finally {
      delete process.env.PUBLIC_ORIGIN;
    }
  });
});
