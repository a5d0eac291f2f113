import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCheckLogCommand } from '../../../src/cli/check-log';
import { runComputeCommand } from '../../../src/cli/compute';
import { uploads } from '../../../src/db/schema';
import { runLogMapping } from '../../../src/lib/logs/generate';
import { SAFETY_CAUTION, SAFETY_CSV_COMMENT } from '../../../src/lib/safety';
import { createApiToken } from '../../../src/lib/server/api-tokens';
import { getDatabase } from '../../../src/lib/server/database';
import { COMPARISON_CSV_COLUMNS } from '../../../src/lib/server/log-comparisons';
import { deleteSheet } from '../../../src/lib/server/sheets';
import type { Role } from '../../../src/lib/roles';
import * as sheetRoute from '../../../src/pages/api/sheets/[sheetId]/index';
import * as logsRoute from '../../../src/pages/api/sheets/[sheetId]/logs/index';
import * as comparisonsRoute from '../../../src/pages/api/sheets/[sheetId]/logs/[logId]/comparisons/index';
import * as comparisonRoute from '../../../src/pages/api/sheets/[sheetId]/logs/[logId]/comparisons/[comparisonId]';
import { demoIdentity, demoTeamId } from '../../helpers/api-context';
import { freePort } from '../../helpers/temp';
import { startRouteServer } from '../../helpers/route-server';
import { createTestSheet } from '../../helpers/test-sheets';
import { generatedRun, TOLERANCES, writeLogFiles } from '../logs/generated-log';

// Exit statuses as a CI gate reads them (issue #12, and common practice for a check command, as in
// GNU diff): 0 within tolerance, 3 outside, 1 bad input, 2 a failure to reach or be let into the server.

const scratch = mkdtempSync(join(tmpdir(), 'check-log-cli-'));
const run = generatedRun(300);
const { sheetFile, mappingFile, cleanLog, faultyLog, badLog } = writeLogFiles(scratch, run);

let server: Awaited<ReturnType<typeof startRouteServer>>;
let sheetId: string;
const tokens: Partial<Record<Role, string>> = {};

interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

/** The command in this process; the reviewer's token unless `token` is given (`null`: none set). */
async function checkLog(args: string[], token?: string | null): Promise<Outcome> {
  let stdout = '';
  let stderr = '';
  const code = await runCheckLogCommand(args, { stdout: (text) => (stdout += text), stderr: (text) => (stderr += text), env: { SLIPLESS_TOKEN: token === null ? undefined : (token ?? tokens.reviewer) } });
  return { code, stdout, stderr };
}

const against = (log: string, ...more: string[]) => ['--url', server.origin, '--sheet', sheetId, '--log', log, '--mapping', mappingFile, ...more];

async function uploadCount(): Promise<number> {
  const database = await getDatabase();
  return (await database.db.select({ id: uploads.id }).from(uploads).where(eq(uploads.sheetId, sheetId))).length;
}

beforeAll(async () => {
  const database = await getDatabase();
  const teamId = await demoTeamId();
  ({ sheetId } = await createTestSheet(database, teamId, 'Check-log CI sheet', run.doc));
  // Tokens of demo-team members at their own roles, made the way the tokens page makes them.
  for (const role of ['reviewer', 'viewer'] as const) {
    const created = await createApiToken(database, await demoIdentity(role), { teamId, name: `ci ${role}`, role });
    if (!created.ok) throw new Error(created.error.message);
    tokens[role] = created.value.token;
  }
  server = await startRouteServer([
    { pattern: '/api/sheets/[sheetId]', module: sheetRoute },
    { pattern: '/api/sheets/[sheetId]/logs', module: logsRoute },
    { pattern: '/api/sheets/[sheetId]/logs/[logId]/comparisons', module: comparisonsRoute },
    { pattern: '/api/sheets/[sheetId]/logs/[logId]/comparisons/[comparisonId]', module: comparisonRoute },
  ]);
});

afterAll(async () => {
  await server?.close();
  // The demo team keeps only its seeded sheets, which other tests read.
  if (sheetId) await deleteSheet(await getDatabase(), sheetId, { userId: null });
  rmSync(scratch, { recursive: true, force: true });
});

describe('check-log CLI through the API with a token', () => {
  it('prints exactly what compute --log prints for the same log and exits 0 within tolerance, with the safety caution on stderr', async () => {
    const [remote, local] = await Promise.all([
      checkLog(against(cleanLog)),
      (async () => {
        let stdout = '';
        const code = await runComputeCommand([sheetFile, '--log', cleanLog, '--mapping', mappingFile], { stdout: (text) => (stdout += text), stderr: () => {} });
        return { code, stdout };
      })(),
    ]);
    expect(remote.stderr).toContain(SAFETY_CAUTION);
    expect(remote.code).toBe(0);
    expect(local.code).toBe(0);
    // One engine on both sides, and one function printing it: the server's stored comparison reads back identical.
    expect(JSON.parse(remote.stdout)).toEqual(JSON.parse(local.stdout));
    const { title, comparison } = JSON.parse(remote.stdout) as { title: string; comparison: { verdict: { withinTolerance: boolean }; joints: { joint: string }[] } };
    expect(title).toBe(run.doc.title);
    expect(comparison.verdict.withinTolerance).toBe(true);
    expect(comparison.joints.map((j) => j.joint)).toEqual(run.doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name)));
  });

  it('exits 3 for a gzip log with an injected commanded-rate fault, naming the joint, against a named revision', async () => {
    const outcome = await checkLog(against(faultyLog, '--revision', '1'));
    expect(outcome.code).toBe(3);
    const { comparison } = JSON.parse(outcome.stdout) as { comparison: { verdict: { withinTolerance: boolean; reasons: string[] } } };
    expect(comparison.verdict.withinTolerance).toBe(false);
    expect(comparison.verdict.reasons[0]).toContain('joint "north-base"');
    expect(outcome.stderr).toContain('revision 1 of sheet');
    expect(outcome.stderr).toContain('outside tolerance');
  });

  it('prints with --format csv the per-sample table compute --log --format csv prints for the same log', async () => {
    const [remote, local] = await Promise.all([
      checkLog(against(cleanLog, '--format', 'csv')),
      (async () => {
        let stdout = '';
        const code = await runComputeCommand([sheetFile, '--log', cleanLog, '--mapping', mappingFile, '--format', 'csv'], { stdout: (text) => (stdout += text), stderr: () => {} });
        return { code, stdout };
      })(),
    ]);
    expect(remote.code).toBe(0);
    expect(local.code).toBe(0);
    // Both files open with the safety caution as a comment line, then the same table.
    const [caution, ...lines] = remote.stdout.trimEnd().split('\n');
    expect(caution).toBe(SAFETY_CSV_COMMENT);
    // One row per logged sample after the header, not the statistics table (COMPARISON_CSV_COLUMNS).
    expect(lines[0]).not.toBe(COMPARISON_CSV_COLUMNS.join(','));
    expect(lines.length).toBe(1 + run.record.tickCount);
    expect(remote.stdout.trimEnd()).toBe(local.stdout.trimEnd());
  });

  it('exits 1 for a bad log with the server\'s error located by line and column, and for a missing file or a bad revision', async () => {
    const bad = await checkLog(against(badLog));
    expect(bad.code).toBe(1);
    expect(bad.stdout).toBe('');
    // The same located message compute prints locally (tests/unit/cli/compute.test.ts).
    expect(bad.stderr).toContain(`${badLog}: line 4, column 1 ("t"): expected a time (a decimal number), found "zero"`);
    const missing = await checkLog(against(join(scratch, 'nope.csv')));
    expect(missing.code).toBe(1);
    expect(missing.stderr).toContain('cannot read the file (ENOENT)');
    const noRevision = await checkLog(against(cleanLog, '--revision', '99'));
    expect(noRevision.code).toBe(1);
    expect(noRevision.stderr).toMatch(/revision: Revision 99 does not exist/);
  });

  it('exits 1 naming the mapping field when the mapping names a joint the sheet lacks', async () => {
    const wrongJoint = join(scratch, 'wrong-joint.json');
    const mapping = runLogMapping(run.doc, TOLERANCES);
    mapping.joints[0]!.joint = 'wrist';
    writeFileSync(wrongJoint, JSON.stringify(mapping));
    const outcome = await checkLog(['--url', server.origin, '--sheet', sheetId, '--log', cleanLog, '--mapping', wrongJoint]);
    expect(outcome.code).toBe(1);
    expect(outcome.stderr).toContain(`${wrongJoint}: joints[0].joint: the sheet has no joint named "wrist"`);
  });

  it('exits 2 for a wrong token before sending the log, and for a missing one', async () => {
    const before = await uploadCount();
    const wrong = await checkLog(against(cleanLog), `slp_${'x'.repeat(43)}`);
    expect(wrong.code).toBe(2);
    expect(wrong.stderr).toMatch(/refused the token in SLIPLESS_TOKEN/);
    const none = await checkLog(against(cleanLog), null);
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/set SLIPLESS_TOKEN/);
    expect(await uploadCount()).toBe(before);
  });

  it('exits 2 when a viewer token is refused the upload, answered before the log is sent, and nothing is stored', async () => {
    const before = await uploadCount();
    // 32 MiB: the refusal comes before the server reads any of it, and the command stops sending then.
    const large = join(scratch, 'large.csv');
    writeFileSync(large, readFileSync(cleanLog, 'utf8').repeat(Math.ceil((32 * 1024 * 1024) / statSync(cleanLog).size)));
    for (const log of [cleanLog, large]) {
      const outcome = await checkLog(against(log), tokens.viewer);
      expect(outcome.code).toBe(2);
      expect(outcome.stderr).toMatch(/needs a token with the owner or reviewer role/);
    }
    expect(await uploadCount()).toBe(before);
  });

  it('exits 2 when the server cannot be reached or is not the app, and 1 for a token given as a flag', async () => {
    const closedPort = await freePort();
    const unreachable = await checkLog(['--url', `http://127.0.0.1:${closedPort}`, '--sheet', sheetId, '--log', cleanLog, '--mapping', mappingFile]);
    expect(unreachable.code).toBe(2);
    expect(unreachable.stderr).toContain(`cannot reach http://127.0.0.1:${closedPort}`);
    // Something other than the app at --url (a proxy's or a portal's page) answering 200 with HTML.
    const portal = createServer((_, res) => res.writeHead(200, { 'content-type': 'text/html' }).end('<html>Sign in to the network</html>'));
    await new Promise<void>((listening) => portal.listen(0, '127.0.0.1', listening));
    const notTheApp = await checkLog(['--url', `http://127.0.0.1:${(portal.address() as AddressInfo).port}`, '--sheet', sheetId, '--log', cleanLog, '--mapping', mappingFile]);
    await new Promise((closed) => portal.close(closed));
    expect(notTheApp.code).toBe(2);
    expect(notTheApp.stderr).toMatch(/is not JSON/);
    const flag = await checkLog([...against(cleanLog), '--token', 'slp_secret']);
    expect(flag.code).toBe(1);
    expect(flag.stderr).toMatch(/read from SLIPLESS_TOKEN only/);
  });
});
