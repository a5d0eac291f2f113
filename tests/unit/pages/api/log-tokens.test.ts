import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditEvents, uploads } from '../../../../src/db/schema';
import { runLogMapping } from '../../../../src/lib/logs/generate';
import type { Identity } from '../../../../src/lib/server/access';
import { createApiToken } from '../../../../src/lib/server/api-tokens';
import { getDatabase } from '../../../../src/lib/server/database';
import { identityForUser } from '../../../../src/lib/server/identity';
import { deleteSheet } from '../../../../src/lib/server/sheets';
import type { Role } from '../../../../src/lib/roles';
import * as logsRoute from '../../../../src/pages/api/sheets/[sheetId]/logs/index';
import * as comparisonsRoute from '../../../../src/pages/api/sheets/[sheetId]/logs/[logId]/comparisons/index';
import { addTestMember, callThroughMiddleware, demoIdentity, demoTeamId } from '../../../helpers/api-context';
import { createTestSheet } from '../../../helpers/test-sheets';
import { generatedRun, logText, TOLERANCES } from '../../logs/generated-log';

/*
 * The log upload and comparison routes as a CI job calls them: a bearer token in the
 * Authorization header (RFC 6750, section 2.1), no session cookie, through the real middleware.
 */

const run = generatedRun(60);
const log = new TextEncoder().encode(logText(run));
const mapping = runLogMapping(run.doc, TOLERANCES);
let sheetId: string;
let reviewerToken: string;
let outsiderToken: string;

async function mint(identity: Identity, teamId: string, role: Role): Promise<string> {
  const created = await createApiToken(await getDatabase(), identity, { teamId, name: `log routes ${role}`, role });
  if (!created.ok) throw new Error(created.error.message);
  return created.value.token;
}

function upload(token: string, sheet = sheetId) {
  return callThroughMiddleware(logsRoute.POST, {
    method: 'POST',
    path: `/api/sheets/${sheet}/logs?fileName=ci-run.csv`,
    params: { sheetId: sheet },
    headers: { authorization: `Bearer ${token}`, 'content-length': String(log.byteLength) },
    body: log,
  });
}

function compare(token: string, logId: string) {
  return callThroughMiddleware(comparisonsRoute.POST, {
    method: 'POST',
    path: `/api/sheets/${sheetId}/logs/${logId}/comparisons`,
    params: { sheetId, logId },
    headers: { authorization: `Bearer ${token}` },
    body: { mapping },
  });
}

beforeAll(async () => {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  ({ sheetId } = await createTestSheet(database, teamId, 'Log routes with tokens', run.doc));
  reviewerToken = await mint(await demoIdentity('reviewer'), teamId, 'reviewer');
  // An owner of another team: the same rights there, none here.
  const outsider = await addTestMember('owner');
  outsiderToken = await mint((await identityForUser(database, outsider.userId, Date.now()))!, outsider.teamId, 'owner');
});

afterAll(async () => {
  // The demo team keeps only its seeded sheets, which other tests read.
  if (sheetId) await deleteSheet(await getDatabase(), sheetId, { userId: null });
});

describe('log routes with a bearer token', () => {
  it('store a log and compare it for a reviewer token of the sheet\'s team, recorded as that reviewer', async () => {
    const uploaded = await upload(reviewerToken);
    expect(uploaded.status).toBe(201);
    const { id: logId, byteSize } = (await uploaded.json()) as { id: string; byteSize: number };
    expect(byteSize).toBe(log.byteLength);
    const compared = await compare(reviewerToken, logId);
    expect(compared.status).toBe(201);
    const record = (await compared.json()) as { verdict: string; createdByName: string; result: { samples: number } };
    expect(record.verdict).toBe('pass');
    expect(record.result.samples).toBe(run.record.tickCount);
    const reviewer = await demoIdentity('reviewer');
    expect(record.createdByName).toBe(reviewer.user.name);
    const database = await getDatabase();
    const actions = await database.db.select({ action: auditEvents.action, actorId: auditEvents.actorId }).from(auditEvents).where(eq(auditEvents.subject, sheetId));
    expect(actions).toEqual(expect.arrayContaining([{ action: 'log.upload', actorId: reviewer.user.id }, { action: 'log.compare', actorId: reviewer.user.id }]));
  });

  it('answer 404 to a token of another team, for the upload and for comparing a log of this sheet, and store nothing', async () => {
    const database = await getDatabase();
    const own = await upload(reviewerToken);
    const { id: logId } = (await own.json()) as { id: string };
    const before = await database.db.select({ id: uploads.id }).from(uploads).where(eq(uploads.sheetId, sheetId));
    const refusedUpload = await upload(outsiderToken);
    expect(refusedUpload.status).toBe(404);
    const refusedCompare = await compare(outsiderToken, logId);
    expect(refusedCompare.status).toBe(404);
    expect(await database.db.select({ id: uploads.id }).from(uploads).where(eq(uploads.sheetId, sheetId))).toEqual(before);
  });
});
