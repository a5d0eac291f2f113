import { readdirSync, readFileSync } from 'node:fs';
import { join, sep } from 'node:path';
import { eq, like } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { comments, invitations, sheets, users } from '../../../../src/db/schema';
import type { Identity } from '../../../../src/lib/server/access';
import { createApiToken, revokeApiToken } from '../../../../src/lib/server/api-tokens';
import { getDatabase } from '../../../../src/lib/server/database';
import { DEMO_PASSWORD, DEMO_TEAM } from '../../../../src/lib/server/demo';
import { identityForUser } from '../../../../src/lib/server/identity';
import { hashPassword } from '../../../../src/lib/server/passwords';
import { getLogStorage } from '../../../../src/lib/server/log-storage';
import { runLogComparison } from '../../../../src/lib/server/log-comparisons';
import { computeMatrixResult } from '../../../../src/lib/server/matrix-results';
import { storeLogUpload } from '../../../../src/lib/server/log-uploads';
import { MAX_LOG_BYTES } from '../../../../src/lib/validation/log-uploads';
import { createTestSheet } from '../../../helpers/test-sheets';
import { addTestMember, callRoute, callThroughMiddleware, demoIdentity, demoTeamId, type Handler } from '../../../helpers/api-context';

/*
 * Every API route × every kind of caller, with the status each must get. Routes are found by
 * listing src/pages/api, so a new route (or a new method on one) fails here until it has a row.
 * Session callers get `locals.identity` from identityForUser; token callers go through the real
 * middleware, which resolves the bearer with identityForToken.
 */

const API_FOLDER = join(process.cwd(), 'src', 'pages', 'api');
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE', 'ALL'] as const;
type Method = (typeof METHODS)[number];

const WHO = ['none', 'viewer', 'reviewer', 'editor', 'owner', 'token', 'revoked', 'other'] as const;
type Who = (typeof WHO)[number];
type Expected = Record<Who, number>;

interface Fixture {
  teamId: string;
  sessions: Record<'viewer' | 'reviewer' | 'editor' | 'owner' | 'other', Identity>;
  /** An editor's token for the demo team at role editor. */
  token: string;
  revokedToken: string;
}

interface Prepared {
  params?: Record<string, string>;
  /** Search part of the URL, e.g. `?team=…`. */
  query?: string;
  body?: unknown;
  /** Undoes what the call changed so later cells see the same world. */
  cleanup?: () => Promise<void>;
}

interface Row {
  route: string;
  method: Method;
  variant?: string;
  prepare?: (fx: Fixture, who: Who) => Prepared | Promise<Prepared>;
  expect: Expected;
}

/** Open to anyone; only a bad bearer token is turned away (by the middleware). */
const PUBLIC = (status: number): Expected => ({ none: status, viewer: status, reviewer: status, editor: status, owner: status, token: status, revoked: 401, other: status });
const ALL_OK = PUBLIC(200);
const SIGNED_IN_OK: Expected = { ...ALL_OK, none: 401 };
/** Account and token management: sessions only, never a token. */
const SESSION_ONLY = (ok: number, other = ok): Expected => ({ none: 401, viewer: ok, reviewer: ok, editor: ok, owner: ok, token: 403, revoked: 401, other });
/** Team management: the owner only; the token (editor role) is refused like an editor; other teams see 404. */
const OWNER_ONLY = (ok: number): Expected => ({ none: 401, viewer: 403, reviewer: 403, editor: 403, owner: ok, token: 403, revoked: 401, other: 404 });

/** Sheet writing: editors and owners (and the editor-role token); other teams see 404. */
const SHEET_WRITERS = (ok: number): Expected => ({ none: 401, viewer: 403, reviewer: 403, editor: ok, owner: ok, token: ok, revoked: 401, other: 404 });
const SESSIONS = ['viewer', 'reviewer', 'editor', 'owner', 'other'] as const;

/** The session identity for a cell, or null for the anonymous and token cells. */
function sessionOf(fx: Fixture, who: Who): Identity | null {
  return who === 'none' || who === 'token' || who === 'revoked' ? null : fx.sessions[who];
}

/** A user id of whoever is calling (the demo editor for token cells). */
function callerId(fx: Fixture, who: Who): string {
  return (sessionOf(fx, who) ?? fx.sessions.editor).user.id;
}

const TABLE_SHEET_TITLE = 'Authorization table scratch sheet';
const exampleDocument = JSON.parse(readFileSync(join(process.cwd(), 'content', 'sheets', 'line4-peg-tilt.json'), 'utf8')) as unknown;

/** Deletes every sheet the table made (created, saved onto or forked), so the demo team keeps its seeded sheets. */
async function deleteTableSheets(): Promise<void> {
  const database = await getDatabase();
  await database.write((db) => db.delete(sheets).where(like(sheets.title, `${TABLE_SHEET_TITLE}%`)));
}

/** A fresh sheet in the demo team to save onto or fork, removed again after the call. */
async function scratchSheet(fx: Fixture, extra: Omit<Prepared, 'params' | 'cleanup'> = {}): Promise<Prepared> {
  const { sheetId } = await createTestSheet(await getDatabase(), fx.teamId, TABLE_SHEET_TITLE, exampleDocument);
  return { params: { sheetId }, cleanup: deleteTableSheets, ...extra };
}

/** The example with a one-target test matrix, so a matrix computes within the table's time. */
const matrixDocument = { ...(exampleDocument as Record<string, unknown>), matrix: { targets: [{ orientation: { axis: [1, 0, 0], angle: '5 deg' } }] } };

/** A scratch sheet whose revision 1 has a matrix, named by `revision`; with `computed`, its result is already stored. */
async function scratchMatrixSheet(fx: Fixture, computed: boolean): Promise<Prepared> {
  const database = await getDatabase();
  const { sheetId } = await createTestSheet(database, fx.teamId, TABLE_SHEET_TITLE, matrixDocument);
  if (computed) {
    const stored = await computeMatrixResult(database, { id: sheetId, teamId: fx.teamId }, 1, { userId: fx.sessions.editor.user.id });
    if (!stored.ok) throw new Error(stored.error.message);
  }
  return { params: { sheetId, revision: '1' }, cleanup: deleteTableSheets };
}

/** A small controller log of the scratch sheet, as a CSV body. */
const TABLE_LOG = new TextEncoder().encode('t,px,py,pz\n0.000,0.10,0.05,0.12\n0.002,0.10,0.05,0.12\n');

/** A scratch sheet with one uploaded log, named by `logId`. */
async function scratchSheetWithLog(fx: Fixture): Promise<Prepared> {
  const prepared = await scratchSheet(fx);
  const database = await getDatabase();
  const sheetId = prepared.params!.sheetId;
  const body = new Blob([TABLE_LOG]).stream();
  const stored = await storeLogUpload(database, getLogStorage(), { sheet: { id: sheetId, teamId: fx.teamId }, fileName: 'table.csv', body, declaredLength: null, limit: MAX_LOG_BYTES, actor: { userId: fx.sessions.reviewer.user.id } });
  if (!stored.ok) throw new Error(stored.error.message);
  return { ...prepared, params: { sheetId, logId: stored.value.id } };
}

/** A log of the scratch sheet with the object's pose (position and quaternion), and a mapping of it with no joints. */
const TABLE_POSE_LOG = new TextEncoder().encode('t,px,py,pz,qw,qx,qy,qz\n0.000,0.10,0.05,0.12,1,0,0,0\n0.002,0.10,0.05,0.12,1,0,0,0\n0.004,0.10,0.05,0.12,1,0,0,0\n');
const TABLE_MAPPING = {
  format: 'slipless.log-mapping',
  version: 1,
  time: { column: 't', unit: 's' },
  pose: { position: { columns: ['px', 'py', 'pz'], unit: 'm' }, orientation: { quaternion: { w: 'qw', x: 'qx', y: 'qy', z: 'qz' } } },
  joints: [],
  tolerances: { rate: '0.05 rad/s', slip: '1 mm/s' },
};

/** A scratch sheet with one pose log, ready to be compared (`body` is the comparison request). */
async function scratchSheetWithPoseLog(fx: Fixture): Promise<Prepared> {
  const prepared = await scratchSheet(fx);
  const database = await getDatabase();
  const sheetId = prepared.params!.sheetId;
  const body = new Blob([TABLE_POSE_LOG]).stream();
  const stored = await storeLogUpload(database, getLogStorage(), { sheet: { id: sheetId, teamId: fx.teamId }, fileName: 'pose.csv', body, declaredLength: null, limit: MAX_LOG_BYTES, actor: { userId: fx.sessions.reviewer.user.id } });
  if (!stored.ok) throw new Error(stored.error.message);
  return { ...prepared, params: { sheetId, logId: stored.value.id }, body: { mapping: TABLE_MAPPING } };
}

/** A scratch sheet with one pose log compared once, named by `comparisonId`. */
async function scratchSheetWithComparison(fx: Fixture): Promise<Prepared> {
  const prepared = await scratchSheetWithPoseLog(fx);
  const database = await getDatabase();
  const { sheetId, logId } = prepared.params!;
  const run = await runLogComparison(database, getLogStorage(), { sheet: { id: sheetId!, teamId: fx.teamId, latestRevision: 1 }, uploadId: logId!, mapping: TABLE_MAPPING, actor: { userId: fx.sessions.reviewer.user.id } });
  if (!run.ok) throw new Error(run.error.message);
  return { ...prepared, body: undefined, params: { sheetId: sheetId!, logId: logId!, comparisonId: run.value.id } };
}

async function newTeamMember(fx: Fixture): Promise<Prepared> {
  const member = await addTestMember('viewer', { teamId: fx.teamId });
  const deleteUser = async () => {
    const database = await getDatabase();
    await database.write((db) => db.delete(users).where(eq(users.id, member.userId)));
  };
  return { params: { teamId: fx.teamId, userId: member.userId }, cleanup: deleteUser };
}

const ROWS: Row[] = [
  { route: 'health.ts', method: 'GET', expect: ALL_OK },
  { route: 'me.ts', method: 'GET', expect: SIGNED_IN_OK },
  {
    route: 'auth/[...auth].ts',
    method: 'GET',
    variant: 'Auth.js CSRF token',
    prepare: () => ({ params: { auth: 'csrf' } }),
    expect: ALL_OK,
  },
  {
    route: 'auth/[...auth].ts',
    method: 'POST',
    variant: 'Auth.js session update without its CSRF token',
    prepare: () => ({ params: { auth: 'session' } }),
    expect: { none: 400, viewer: 400, reviewer: 400, editor: 400, owner: 400, token: 400, revoked: 401, other: 400 },
  },
  { route: 'tokens.ts', method: 'GET', expect: SESSION_ONLY(200) },
  {
    route: 'tokens.ts',
    method: 'POST',
    variant: 'viewer token',
    prepare: (fx) => ({ body: { teamId: fx.teamId, name: 'table', role: 'viewer' } }),
    expect: { ...SESSION_ONLY(201), other: 404 },
  },
  {
    route: 'tokens.ts',
    method: 'POST',
    variant: 'owner token: above everyone but the owner',
    prepare: (fx) => ({ body: { teamId: fx.teamId, name: 'table', role: 'owner' } }),
    expect: { none: 401, viewer: 403, reviewer: 403, editor: 403, owner: 201, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'tokens.ts',
    method: 'POST',
    variant: 'empty name',
    prepare: (fx) => ({ body: { teamId: fx.teamId, name: ' ', role: 'viewer' } }),
    expect: SESSION_ONLY(400),
  },
  {
    route: 'tokens/[tokenId].ts',
    method: 'DELETE',
    variant: "the demo editor's token",
    prepare: async (fx) => {
      const created = await createApiToken(await getDatabase(), fx.sessions.editor, { teamId: fx.teamId, name: 'to revoke', role: 'viewer' });
      if (!created.ok) throw new Error(created.error.message);
      return { params: { tokenId: created.value.summary.id } };
    },
    expect: { none: 401, viewer: 404, reviewer: 404, editor: 204, owner: 204, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'teams/[teamId]/index.ts',
    method: 'PATCH',
    variant: 'rename to its current name',
    prepare: (fx) => ({ params: { teamId: fx.teamId }, body: { name: DEMO_TEAM.name } }),
    expect: OWNER_ONLY(200),
  },
  {
    route: 'teams/[teamId]/index.ts',
    method: 'DELETE',
    variant: 'wrong confirmation, so nothing is deleted',
    prepare: (fx) => ({ params: { teamId: fx.teamId }, body: { confirm: 'not-the-slug' } }),
    expect: OWNER_ONLY(400),
  },
  {
    route: 'teams/[teamId]/members.ts',
    method: 'GET',
    prepare: (fx) => ({ params: { teamId: fx.teamId } }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'teams/[teamId]/members/[userId].ts',
    method: 'PATCH',
    variant: 'viewer to reviewer',
    prepare: async (fx) => ({ ...(await newTeamMember(fx)), body: { role: 'reviewer' } }),
    expect: OWNER_ONLY(200),
  },
  {
    route: 'teams/[teamId]/members/[userId].ts',
    method: 'PATCH',
    variant: 'unknown role',
    prepare: async (fx) => ({ ...(await newTeamMember(fx)), body: { role: 'admin' } }),
    expect: OWNER_ONLY(400),
  },
  {
    route: 'teams/[teamId]/members/[userId].ts',
    method: 'PATCH',
    variant: 'demoting the only owner',
    prepare: (fx) => ({ params: { teamId: fx.teamId, userId: fx.sessions.owner.user.id }, body: { role: 'editor' } }),
    expect: OWNER_ONLY(409),
  },
  {
    route: 'teams/[teamId]/members/[userId].ts',
    method: 'DELETE',
    variant: 'a viewer',
    prepare: (fx) => newTeamMember(fx),
    expect: OWNER_ONLY(204),
  },
  {
    route: 'me/team.ts',
    method: 'PUT',
    variant: 'switch to the demo team',
    prepare: (fx) => ({ body: { teamId: fx.teamId } }),
    expect: { ...SESSION_ONLY(200), other: 404 },
  },
  {
    route: 'teams/[teamId]/tokens.ts',
    method: 'GET',
    prepare: (fx) => ({ params: { teamId: fx.teamId } }),
    expect: OWNER_ONLY(200),
  },
  {
    route: 'teams/[teamId]/invitations.ts',
    method: 'GET',
    prepare: (fx) => ({ params: { teamId: fx.teamId } }),
    expect: OWNER_ONLY(200),
  },
  {
    route: 'teams/[teamId]/invitations.ts',
    method: 'POST',
    variant: 'someone already in the team (refused before any mail)',
    prepare: (fx) => ({ params: { teamId: fx.teamId }, body: { email: 'viewer@tarnwhistle.example', role: 'editor' } }),
    expect: OWNER_ONLY(409),
  },
  {
    route: 'teams/[teamId]/invitations.ts',
    method: 'POST',
    variant: 'not an e-mail address',
    prepare: (fx) => ({ params: { teamId: fx.teamId }, body: { email: 'line4-lead', role: 'editor' } }),
    expect: OWNER_ONLY(400),
  },
  {
    route: 'teams/[teamId]/invitations/[invitationId].ts',
    method: 'DELETE',
    variant: 'a pending invitation',
    prepare: async (fx) => {
      const database = await getDatabase();
      const [row] = await database.write((db) =>
        db
          .insert(invitations)
          .values({ teamId: fx.teamId, email: 'table-invitee@slipless.example', role: 'viewer', tokenHash: crypto.randomUUID(), expiresAt: new Date(Date.now() + 3_600_000) })
          .returning({ id: invitations.id }),
      );
      return { params: { teamId: fx.teamId, invitationId: row.id } };
    },
    expect: OWNER_ONLY(204),
  },
  {
    route: 'invitations/accept.ts',
    method: 'POST',
    variant: 'a link that was never issued (the token is the proof, so anyone may try)',
    prepare: () => ({ body: { token: 'inv_never-issued' } }),
    expect: PUBLIC(404),
  },
  {
    route: 'account/password-reset.ts',
    method: 'POST',
    variant: 'the same answer for every address',
    prepare: () => ({ body: { email: 'nobody@slipless.example' } }),
    expect: PUBLIC(202),
  },
  {
    route: 'account/password-reset/confirm.ts',
    method: 'POST',
    variant: 'a link that was never issued',
    prepare: () => ({ body: { token: 'never-issued', password: 'a-long-new-password' } }),
    expect: PUBLIC(404),
  },
  {
    route: 'sheets/index.ts',
    method: 'GET',
    variant: 'list the demo team',
    prepare: (fx) => ({ query: `?team=${fx.teamId}` }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/index.ts',
    method: 'POST',
    variant: 'create in the demo team',
    prepare: (fx) => ({ body: { teamId: fx.teamId, title: TABLE_SHEET_TITLE, document: exampleDocument }, cleanup: deleteTableSheets }),
    expect: SHEET_WRITERS(201),
  },
  {
    route: 'sheets/index.ts',
    method: 'POST',
    variant: 'no title',
    prepare: (fx) => ({ body: { teamId: fx.teamId, title: '', document: exampleDocument } }),
    expect: { ...SIGNED_IN_OK, ...Object.fromEntries(SESSIONS.map((who) => [who, 400])), token: 400 },
  },
  {
    route: 'sheets/[sheetId]/index.ts',
    method: 'GET',
    prepare: (fx) => scratchSheet(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/index.ts',
    method: 'DELETE',
    prepare: (fx) => scratchSheet(fx),
    expect: OWNER_ONLY(204),
  },
  {
    route: 'sheets/[sheetId]/revisions.ts',
    method: 'GET',
    prepare: (fx) => scratchSheet(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/revisions.ts',
    method: 'POST',
    variant: 'save on the latest revision',
    prepare: (fx) => scratchSheet(fx, { body: { baseRevision: 1, document: exampleDocument, message: 'table' } }),
    expect: SHEET_WRITERS(201),
  },
  {
    route: 'sheets/[sheetId]/revisions/[revision]/matrix.ts',
    method: 'GET',
    prepare: (fx) => scratchMatrixSheet(fx, true),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/revisions/[revision]/matrix.ts',
    method: 'POST',
    variant: 'run the matrix of revision 1',
    prepare: (fx) => scratchMatrixSheet(fx, false),
    expect: SHEET_WRITERS(201),
  },
  {
    route: 'sheets/[sheetId]/revisions/[revision]/matrix.ts',
    method: 'POST',
    variant: 'a revision without a matrix',
    prepare: (fx) => scratchSheet(fx).then((prepared) => ({ ...prepared, params: { ...prepared.params, revision: '1' } })),
    expect: SHEET_WRITERS(400),
  },
  {
    route: 'sheets/[sheetId]/fork.ts',
    method: 'POST',
    prepare: (fx) => scratchSheet(fx, { body: { title: `${TABLE_SHEET_TITLE} (fork)` } }),
    expect: SHEET_WRITERS(201),
  },
  {
    route: 'sheets/[sheetId]/comments.ts',
    method: 'GET',
    prepare: (fx) => scratchSheet(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/comments.ts',
    method: 'POST',
    prepare: (fx) => scratchSheet(fx, { body: { revision: 1, body: 'Check the left roll rate.' } }),
    expect: { none: 401, viewer: 403, reviewer: 201, editor: 201, owner: 201, token: 201, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/comments.ts',
    method: 'PATCH',
    variant: "resolving a remark on a revision none of the callers wrote: checkers only",
    prepare: async (fx) => {
      const prepared = await scratchSheet(fx);
      const database = await getDatabase();
      const [remark] = await database.write((db) =>
        db.insert(comments).values({ sheetId: prepared.params!.sheetId, revision: 1, body: 'Check the left roll rate.' }).returning({ id: comments.id }),
      );
      return { ...prepared, body: { id: remark.id, resolved: true } };
    },
    expect: { none: 401, viewer: 403, reviewer: 200, editor: 403, owner: 200, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/reviews.ts',
    method: 'GET',
    prepare: (fx) => scratchSheet(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/reviews.ts',
    method: 'POST',
    prepare: (fx) => scratchSheet(fx, { body: { revision: 1, verdict: 'checked', body: 'Numbers check out.' } }),
    expect: { none: 401, viewer: 403, reviewer: 201, editor: 403, owner: 201, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/compare.ts',
    method: 'GET',
    variant: 'revision 1 with itself',
    prepare: (fx) => scratchSheet(fx, { query: '?from=1&to=1' }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/export.ts',
    method: 'GET',
    variant: 'results as CSV',
    prepare: (fx) => scratchSheet(fx, { query: '?format=csv' }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/index.ts',
    method: 'GET',
    prepare: (fx) => scratchSheet(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/index.ts',
    method: 'POST',
    variant: 'a CSV log',
    prepare: (fx) => scratchSheet(fx, { body: TABLE_LOG, query: '?fileName=table.csv' }),
    expect: { none: 401, viewer: 403, reviewer: 201, editor: 403, owner: 201, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/index.ts',
    method: 'POST',
    variant: 'no file name',
    prepare: (fx) => scratchSheet(fx, { body: TABLE_LOG }),
    expect: { none: 401, viewer: 403, reviewer: 400, editor: 403, owner: 400, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId].ts',
    method: 'GET',
    variant: 'a log with its preview',
    prepare: (fx) => scratchSheetWithLog(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId].ts',
    method: 'DELETE',
    prepare: (fx) => scratchSheetWithLog(fx),
    expect: { none: 401, viewer: 403, reviewer: 204, editor: 403, owner: 204, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId]/comparisons/index.ts',
    method: 'GET',
    variant: 'a log\'s comparisons and saved mapping',
    prepare: async (fx) => ({ ...(await scratchSheetWithPoseLog(fx)), body: undefined }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId]/comparisons/index.ts',
    method: 'POST',
    variant: 'a pose mapping',
    prepare: (fx) => scratchSheetWithPoseLog(fx),
    expect: { none: 401, viewer: 403, reviewer: 201, editor: 403, owner: 201, token: 403, revoked: 401, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId]/comparisons/[comparisonId].ts',
    method: 'GET',
    variant: 'statistics as CSV',
    prepare: async (fx) => ({ ...(await scratchSheetWithComparison(fx)), query: '?format=csv' }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/logs/[logId]/comparisons/[comparisonId].ts',
    method: 'GET',
    variant: 'per-sample series as CSV',
    prepare: async (fx) => ({ ...(await scratchSheetWithComparison(fx)), query: '?format=series' }),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/[sheetId]/comparisons.ts',
    method: 'GET',
    variant: 'the sheet\'s comparisons of all its logs',
    prepare: (fx) => scratchSheetWithComparison(fx),
    expect: { ...SIGNED_IN_OK, other: 404 },
  },
  {
    route: 'sheets/import.ts',
    method: 'POST',
    variant: 'a valid sheet file',
    prepare: (fx) => ({
      body: { teamId: fx.teamId, fileName: 'table.json', title: TABLE_SHEET_TITLE, content: JSON.stringify(exampleDocument) },
      cleanup: deleteTableSheets,
    }),
    expect: SHEET_WRITERS(201),
  },
  {
    route: 'sheets/import.ts',
    method: 'POST',
    variant: 'a file that is not JSON',
    prepare: (fx) => ({ body: { teamId: fx.teamId, fileName: 'table.json', content: '{ "format": ' } }),
    expect: SHEET_WRITERS(400),
  },
  {
    route: 'account/password.ts',
    method: 'POST',
    variant: 'correct current password',
    prepare: (fx, who) => ({
      body: { currentPassword: DEMO_PASSWORD, newPassword: 'a-rotated-password' },
      cleanup: async () => {
        const passwordHash = await hashPassword(DEMO_PASSWORD);
        const database = await getDatabase();
        await database.write((db) => db.update(users).set({ passwordHash }).where(eq(users.id, callerId(fx, who))));
      },
    }),
    expect: SESSION_ONLY(204),
  },
  {
    route: 'account/password.ts',
    method: 'POST',
    variant: 'wrong current password',
    prepare: () => ({ body: { currentPassword: 'not-the-password', newPassword: 'a-rotated-password' } }),
    expect: SESSION_ONLY(400),
  },
];

/** Every route file under src/pages/api, as a path relative to it with forward slashes. */
function discoverRoutes(): string[] {
  return readdirSync(API_FOLDER, { recursive: true, encoding: 'utf8' })
    .filter((path) => /\.(ts|js)$/.test(path))
    .map((path) => path.split(sep).join('/'))
    .sort();
}

const routeModules = import.meta.glob<Partial<Record<Method, Handler>>>('../../../../src/pages/api/**/*.{ts,js}');

async function loadRoute(route: string): Promise<Partial<Record<Method, Handler>>> {
  const load = routeModules[`../../../../src/pages/api/${route}`];
  if (!load) throw new Error(`No module for ${route}`);
  return load();
}

/** The URL path of a route file with its parameters filled in. */
function urlPath(route: string, params: Record<string, string>): string {
  const path = route
    .replace(/\.(ts|js)$/, '')
    .replace(/(^|\/)index$/, '')
    .replace(/\[(?:\.\.\.)?(\w+)\]/g, (_, name: string) => params[name] ?? `missing-${name}`);
  return `/api/${path}`.replace(/\/$/, '');
}

async function runCell(fx: Fixture, row: Row, who: Who): Promise<number> {
  const handler = (await loadRoute(row.route))[row.method];
  if (!handler) throw new Error(`${row.route} exports no ${row.method}`);
  const prepared = (await row.prepare?.(fx, who)) ?? {};
  const params = prepared.params ?? {};
  const spec = { method: row.method, path: urlPath(row.route, params) + (prepared.query ?? ''), params, body: prepared.body };
  try {
    const response =
      who === 'token' || who === 'revoked'
        ? await callThroughMiddleware(handler, { ...spec, headers: { authorization: `Bearer ${who === 'token' ? fx.token : fx.revokedToken}` } })
        : await callRoute(handler, { ...spec, identity: sessionOf(fx, who) });
    return response.status;
  } finally {
    await prepared.cleanup?.();
  }
}

const discovered = discoverRoutes();
const cellCount = ROWS.length * WHO.length;
let fixture: Fixture;

beforeAll(async () => {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  const [viewer, reviewer, editor, owner] = await Promise.all((['viewer', 'reviewer', 'editor', 'owner'] as const).map(demoIdentity));
  const outsider = await addTestMember('owner', { password: DEMO_PASSWORD });
  const other = (await identityForUser(database, outsider.userId, Date.now()))!;
  const live = await createApiToken(database, editor, { teamId, name: 'table: live', role: 'editor' });
  const dead = await createApiToken(database, editor, { teamId, name: 'table: revoked', role: 'editor' });
  if (!live.ok || !dead.ok) throw new Error('could not create the table tokens');
  await revokeApiToken(database, editor, dead.value.summary.id);
  fixture = { teamId, sessions: { viewer, reviewer, editor, owner, other }, token: live.value.token, revokedToken: dead.value.token };
  console.log(`authorization table: ${discovered.length} route files, ${ROWS.length} rows × ${WHO.length} identities = ${cellCount} cells`);
});

describe(`authorization table (${ROWS.length} rows × ${WHO.length} identities = ${cellCount} cells)`, () => {
  it('has a row for every method of every route under src/pages/api', async () => {
    const missing: string[] = [];
    for (const route of discovered) {
      const module = await loadRoute(route);
      for (const method of METHODS) {
        if (module[method] && !ROWS.some((r) => r.route === route && r.method === method)) missing.push(`${method} ${route}`);
      }
    }
    const stale = ROWS.filter((r) => !discovered.includes(r.route)).map((r) => `${r.method} ${r.route}`);
    expect({ missing, stale }).toEqual({ missing: [], stale: [] });
  });

  for (const row of ROWS) {
    it(`${row.method} ${row.route}${row.variant ? ` (${row.variant})` : ''}`, async () => {
      const actual = {} as Expected;
      for (const who of WHO) actual[who] = await runCell(fixture, row, who);
      expect(actual).toEqual(row.expect);
    });
  }
});
