import { gzipSync } from 'node:zlib';
import { SAFETY_CSV_COMMENT } from '../../../src/lib/safety';
import { and, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import type { Readable } from 'node:stream';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { logComparisons } from '../../../src/db/schema';
import type { LogComparisonList, LogComparisonRecord, SheetComparisonList } from '../../../src/lib/contract/log-comparisons';
import type { Identity } from '../../../src/lib/server/access';
import { getDatabase } from '../../../src/lib/server/database';
import { identityForUser } from '../../../src/lib/server/identity';
import { COMPARISON_CSV_COLUMNS, latestComparisonsOfRevision } from '../../../src/lib/server/log-comparisons';
import { getLogStorage } from '../../../src/lib/server/log-storage';
import { storeLogUpload } from '../../../src/lib/server/log-uploads';
import { saveRevision } from '../../../src/lib/server/sheets';
import { runLogMapping } from '../../../src/lib/logs/generate';
import { MAX_LOG_BYTES } from '../../../src/lib/validation/log-uploads';
import * as comparisonsRoute from '../../../src/pages/api/sheets/[sheetId]/logs/[logId]/comparisons/index';
import * as comparisonRoute from '../../../src/pages/api/sheets/[sheetId]/logs/[logId]/comparisons/[comparisonId]';
import * as sheetComparisonsRoute from '../../../src/pages/api/sheets/[sheetId]/comparisons';
import { addTestMember, callRoute, demoIdentity, demoTeamId } from '../../helpers/api-context';
import { createTestSheet } from '../../helpers/test-sheets';
import { generatedRun, logText, TOLERANCES } from '../logs/generated-log';

// A short run keeps the suite quick; 120 ticks of 5 ms still cross the fault window below.
const run = generatedRun(120);
const { doc, header } = run;
const mapping = runLogMapping(doc, TOLERANCES);
const jointNames = doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name));
const FAULTY_JOINT = jointNames[4]!;
/** Whether a finger follows steer-and-roll: the sheet's choice, and a base, a pivot and a roll joint (the commanded-solution rule). */
const followsSteer = (finger: (typeof doc.hand.fingers)[number]) =>
  (doc.commanded ?? 'steer-and-roll') === 'steer-and-roll' && (['base', 'pivot', 'roll'] as const).every((role) => finger.joints.some((j) => j.role === role));
/** Each joint's sheet-rate column, named by the solution its finger follows. */
const sheetColumn = new Map(doc.hand.fingers.flatMap((f) => f.joints.map((j) => [j.name, `${j.name}.sheet_${followsSteer(f) ? 'steer_and_roll' : 'full'}_rad_s`] as const)));
/** An offset far past the 0.05 rad/s tolerance, added to one joint's logged commanded rate over ticks 40 to 79. */
const FAULT_OFFSET = 0.5;

let sheetId: string;
let teamId: string;
let reviewer: Identity;
let viewer: Identity;
let outsider: Identity;

async function upload(text: string | Uint8Array, fileName = 'tarnwhistle-line2.csv'): Promise<string> {
  const database = await getDatabase();
  const bytes: Uint8Array<ArrayBuffer> = typeof text === 'string' ? new TextEncoder().encode(text) : new Uint8Array(text);
  const stored = await storeLogUpload(database, getLogStorage(), {
    sheet: { id: sheetId, teamId },
    fileName,
    body: new Blob([bytes]).stream(),
    declaredLength: null,
    limit: MAX_LOG_BYTES,
    actor: { userId: reviewer.user.id },
  });
  if (!stored.ok) throw new Error(stored.error.message);
  return stored.value.id;
}

function post(logId: string, body: unknown, identity: Identity | null = reviewer) {
  return callRoute(comparisonsRoute.POST, { method: 'POST', path: `/api/sheets/${sheetId}/logs/${logId}/comparisons`, params: { sheetId, logId }, body, identity });
}

function list(logId: string, identity: Identity | null = reviewer) {
  return callRoute(comparisonsRoute.GET, { path: `/api/sheets/${sheetId}/logs/${logId}/comparisons`, params: { sheetId, logId }, identity });
}

async function compared(logId: string, body: unknown = { mapping }): Promise<LogComparisonRecord> {
  const response = await post(logId, body);
  if (response.status !== 201) throw new Error(`${response.status} ${await response.text()}`);
  return response.json();
}

let cleanLogId: string;

beforeAll(async () => {
  const database = await getDatabase();
  teamId = await demoTeamId();
  ({ sheetId } = await createTestSheet(database, teamId, 'Log comparison test sheet', doc));
  [reviewer, viewer] = await Promise.all([demoIdentity('reviewer'), demoIdentity('viewer')]);
  const other = await addTestMember('owner');
  outsider = (await identityForUser(database, other.userId, Date.now()))!;
  cleanLogId = await upload(logText(run));
});

describe('comparing a stored log with the sheet (route and service)', () => {
  it('passes a log generated from the sheet\'s own run and stores the row tied to the latest revision (second route: the run itself)', async () => {
    const record = await compared(cleanLogId);
    expect(record.status).toBe('done');
    expect(record.verdict).toBe('pass');
    expect(record.revision).toBe(1);
    expect(record.result!.samples).toBe(run.record.tickCount);
    expect(record.result!.joints.map((j) => j.joint)).toEqual(jointNames);
    const database = await getDatabase();
    const [row] = await database.db.select().from(logComparisons).where(eq(logComparisons.id, record.id));
    expect(row).toMatchObject({ sheetId, uploadId: cleanLogId, revision: 1, status: 'done', verdict: 'pass', createdBy: reviewer.user.id });
  });

  it('fails a log with a commanded-rate fault injected on one joint and names that joint', async () => {
    const column = header.indexOf(`${FAULTY_JOINT}.commanded`);
    const faulty = await upload(logText(run, (row, tick) => {
      if (tick >= 40 && tick < 80) row[column]! += FAULT_OFFSET;
    }));
    const record = await compared(faulty);
    expect(record.verdict).toBe('fail');
    const joints = record.result!.joints;
    const bad = joints.filter((j) => j.withinFraction < 1).map((j) => j.joint);
    expect(bad).toEqual([FAULTY_JOINT]);
    // The residual is the injected offset itself (logged - sheet, the rest of the row being the run's own numbers).
    expect(joints.find((j) => j.joint === FAULTY_JOINT)!.max).toBeCloseTo(FAULT_OFFSET, 9);
    expect(record.result!.verdict.reasons.join(' ')).toContain(FAULTY_JOINT);
  });

  it('judges against the revision asked for: revision 1 passes, a revision 2 with the gain doubled fails (the law is linear in the gain)', async () => {
    const database = await getDatabase();
    const changed = structuredClone(doc);
    changed.motion.run.gain *= 2;
    const saved = await saveRevision(database, { sheetId, baseRevision: 1, document: changed, actor: { userId: reviewer.user.id } });
    expect(saved.ok).toBe(true);
    const latest = await compared(cleanLogId);
    const first = await compared(cleanLogId, { mapping, revision: 1 });
    expect([latest.revision, latest.verdict]).toEqual([2, 'fail']);
    expect([first.revision, first.verdict]).toEqual([1, 'pass']);
    const rows = await database.db.select({ revision: logComparisons.revision }).from(logComparisons).where(and(eq(logComparisons.id, latest.id)));
    expect(rows).toEqual([{ revision: 2 }]);
    const missing = await post(cleanLogId, { mapping, revision: 99 });
    expect(missing.status).toBe(404);
    expect((await missing.json()).error.path).toBe('revision');
  });

  it('reads a gzip-compressed log (RFC 1952, node:zlib) to the same statistics as the plain one', async () => {
    const gzipped = await upload(new Uint8Array(gzipSync(logText(run))), 'tarnwhistle-line2.csv.gz');
    const plain = await compared(cleanLogId, { mapping, revision: 1 });
    const packed = await compared(gzipped, { mapping, revision: 1 });
    expect(packed.result!.joints).toEqual(plain.result!.joints);
    expect(packed.verdict).toBe('pass');
  });

  it('answers 422 with located issues (line, column) for a log with a cell that is not a number', async () => {
    const column = header.indexOf(`${jointNames[1]}.angle`);
    const bad = await upload(logText(run, (row, tick) => {
      if (tick === 5) row[column] = Number.NaN;
    }));
    const response = await post(bad, { mapping });
    expect(response.status).toBe(422);
    const { error } = await response.json();
    // Line 7: the header is line 1 and tick 5 the sixth data row; columns counted from 1 as in a spreadsheet.
    expect(error.issues).toContainEqual(expect.objectContaining({ line: 7, column: column + 1 }));
    const database = await getDatabase();
    expect(await database.db.select().from(logComparisons).where(eq(logComparisons.uploadId, bad))).toEqual([]);
  });

  it('closes the stored file when the comparison stops early (a bad line, a mapping naming a joint the sheet lacks), rather than leaving it to the garbage collector', async () => {
    const column = header.indexOf(`${jointNames[0]}.angle`);
    // Longer than one read of the file (64 KiB), so the engine stops with most of the file unread.
    const long = generatedRun(600);
    const text = logText(long, (row, tick) => {
      if (tick === 3) row[column] = Number.NaN;
    });
    expect(text.length).toBeGreaterThan(4 * 65536);
    const badLine = await upload(text);
    const unknownJoint = structuredClone(mapping);
    unknownJoint.joints[0]!.joint = 'no-such-joint';
    const storage = getLogStorage();
    const read = storage.get.bind(storage);
    const opened: Readable[] = [];
    const spy = vi.spyOn(storage, 'get').mockImplementation(async (key) => {
      const stream = await read(key);
      opened.push(stream);
      return stream;
    });
    try {
      expect((await post(badLine, { mapping })).status).toBe(422);
      expect((await post(cleanLogId, { mapping: unknownJoint })).status).toBe(400);
    } finally {
      spy.mockRestore();
    }
    expect(opened.length).toBeGreaterThanOrEqual(4);
    // Each stream opened for the comparisons (the previews' and the engine's) is closed within a second of the answer.
    const closedWithin = (stream: Readable) => (stream.closed ? Promise.resolve(true) : Promise.race([new Promise<boolean>((settle) => stream.once('close', () => settle(true))), new Promise<boolean>((settle) => setTimeout(() => settle(false), 1000))]));
    expect(await Promise.all(opened.map(closedWithin))).toEqual(opened.map(() => true));
  });

  it('refuses a mapping field by field, naming mapping.<path>: a unit the schema lacks and a joint the sheet lacks', async () => {
    const badUnit = structuredClone(mapping) as { time: { unit: string } };
    badUnit.time.unit = 'fortnight';
    const unit = await post(cleanLogId, { mapping: badUnit });
    expect(unit.status).toBe(400);
    expect((await unit.json()).error.path).toBe('mapping.time.unit');
    const badJoint = structuredClone(mapping);
    badJoint.joints[2]!.joint = 'no-such-joint';
    const joint = await post(cleanLogId, { mapping: badJoint });
    expect(joint.status).toBe(400);
    const { error } = await joint.json();
    expect(error.path).toBe('mapping.joints[2].joint');
    expect(error.message).toContain('no-such-joint');
  });

  it('lets every member read and only log uploaders run; other teams see 404', async () => {
    expect((await post(cleanLogId, { mapping }, viewer)).status).toBe(403);
    expect((await post(cleanLogId, { mapping }, outsider)).status).toBe(404);
    expect((await post(cleanLogId, { mapping }, null)).status).toBe(401);
    expect((await list(cleanLogId, viewer)).status).toBe(200);
    expect((await list(cleanLogId, outsider)).status).toBe(404);
  });

  it('offers the mapping last used by the team for a log with the same header, and none for another header', async () => {
    const sameHeader = await upload(logText(run));
    const offered: LogComparisonList = await (await list(sameHeader)).json();
    expect(offered.items).toEqual([]);
    expect(offered.savedMapping).toEqual(mapping);
    const otherHeader = await upload('time_s,x,y,z\n0,0.1,0.05,0.12\n0.002,0.1,0.05,0.12\n');
    expect(((await (await list(otherHeader)).json()) as LogComparisonList).savedMapping).toBeNull();
  });

  it('exports per-joint and per-contact statistics as CSV that reads back (RFC 4180, papaparse) to the stored numbers', async () => {
    const record = await compared(cleanLogId, { mapping, revision: 1 });
    const response = await callRoute(comparisonRoute.GET, {
      path: `/api/sheets/${sheetId}/logs/${cleanLogId}/comparisons/${record.id}?format=csv`,
      params: { sheetId, logId: cleanLogId, comparisonId: record.id },
      identity: viewer,
    });
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toContain('text/csv');
    const text = await response.text();
    // The safety caution first, as a "#" comment line that papaparse skips with comments: '#' (its documented option).
    expect(text.split('\n')[0]).toBe(SAFETY_CSV_COMMENT);
    const table = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true, comments: '#' });
    expect(table.meta.fields).toEqual([...COMPARISON_CSV_COLUMNS]);
    const result = record.result!;
    expect(table.data).toHaveLength(result.joints.length + result.contacts.length);
    result.joints.forEach((joint, i) => {
      expect(table.data[i]).toMatchObject({ kind: 'joint', name: joint.joint, unit: 'rad/s', note: `sheet rates: ${result.solution}` });
      expect(Number(table.data[i]!.rms)).toBe(joint.rms);
      expect(Number(table.data[i]!.within_fraction)).toBe(joint.withinFraction);
    });
    expect(table.data.slice(result.joints.length).every((row) => row.kind === 'contact' && row.unit === 'm/s')).toBe(true);
  });

  it('exports the per-sample table (?format=series) whose rows, read back with papaparse, give the stored statistics: residual = logged − sheet, RMS and max per joint', async () => {
    const column = header.indexOf(`${FAULTY_JOINT}.commanded`);
    const faulty = await upload(new Uint8Array(gzipSync(logText(run, (row, tick) => {
      if (tick >= 40 && tick < 80) row[column]! += FAULT_OFFSET;
    }))), 'tarnwhistle-line2-fault.csv.gz');
    const record = await compared(faulty, { mapping, revision: 1 });
    const response = await callRoute(comparisonRoute.GET, {
      path: `/api/sheets/${sheetId}/logs/${faulty}/comparisons/${record.id}?format=series`,
      params: { sheetId, logId: faulty, comparisonId: record.id },
      identity: viewer,
    });
    expect(response.status).toBe(200);
    expect(response.headers.get('content-disposition')).toContain('-series.csv');
    const text = await response.text();
    expect(text.split('\n')[0]).toBe(SAFETY_CSV_COMMENT);
    const table = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true, comments: '#' });
    const result = record.result!;
    expect(table.data).toHaveLength(result.samples);
    const fingers = doc.hand.fingers.map((f) => f.name);
    expect(table.meta.fields).toEqual([
      'line', 'time_s', ...jointNames.flatMap((j) => [`${j}.logged_rad_s`, sheetColumn.get(j)!, `${j}.residual_rad_s`]), ...fingers.map((f) => `${f}.slip_m_s`), 'warnings',
    ]);
    // The log's first data row is line 2 (line 1 the header), one row per tick at the run's step.
    expect(table.data[0]!.line).toBe('2');
    expect(Number(table.data[41]!.time_s)).toBeCloseTo(41 * doc.motion.run.dt, 12);
    for (const joint of result.joints) {
      const residuals = table.data.map((row) => Number(row[`${joint.joint}.residual_rad_s`]));
      table.data.forEach((row, i) => expect(residuals[i]).toBe(Number(row[`${joint.joint}.logged_rad_s`]) - Number(row[sheetColumn.get(joint.joint)!])));
      // RMS = sqrt(mean of squares), the definition the statistics use.
      const rms = Math.sqrt(residuals.reduce((sum, r) => sum + r * r, 0) / residuals.length);
      expect(rms).toBeCloseTo(joint.rms, 12);
      expect(Math.max(...residuals.map(Math.abs))).toBe(joint.max);
    }
    expect(Number(table.data[60]![`${FAULTY_JOINT}.residual_rad_s`])).toBeCloseTo(FAULT_OFFSET, 9);
  });

  it('refuses an export format it does not know, naming the field, and 404s a comparison of another log', async () => {
    const record = await compared(cleanLogId, { mapping, revision: 1 });
    const bad = await callRoute(comparisonRoute.GET, {
      path: `/api/sheets/${sheetId}/logs/${cleanLogId}/comparisons/${record.id}?format=xlsx`,
      params: { sheetId, logId: cleanLogId, comparisonId: record.id },
      identity: viewer,
    });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.path).toBe('format');
    const otherLog = await upload(logText(run));
    const missing = await callRoute(comparisonRoute.GET, {
      path: `/api/sheets/${sheetId}/logs/${otherLog}/comparisons/${record.id}?format=series`,
      params: { sheetId, logId: otherLog, comparisonId: record.id },
      identity: viewer,
    });
    expect(missing.status).toBe(404);
    expect((await missing.json()).error.path).toBe('comparisonId');
  });

  it('lists the sheet\'s comparisons of all its logs, newest first, with revision, log file, verdict and date, and the latest revision', async () => {
    const before = Date.now();
    const record = await compared(cleanLogId, { mapping, revision: 1 });
    const response = await callRoute(sheetComparisonsRoute.GET, { path: `/api/sheets/${sheetId}/comparisons`, params: { sheetId }, identity: viewer });
    expect(response.status).toBe(200);
    const listed: SheetComparisonList = await response.json();
    expect(listed.latestRevision).toBe(2);
    expect(listed.items[0]).toMatchObject({ id: record.id, uploadId: cleanLogId, fileName: 'tarnwhistle-line2.csv', revision: 1, verdict: 'pass', status: 'done' });
    expect(Date.parse(listed.items[0]!.createdAt as unknown as string)).toBeGreaterThanOrEqual(before - 1000);
    expect(listed.items.map((item) => item.revision)).toContain(2);
    const times = listed.items.map((item) => Date.parse(item.createdAt as unknown as string));
    expect(times).toEqual([...times].sort((a, b) => b - a));
    expect(listed.items.every((item) => !('result' in item))).toBe(true);
    expect((await callRoute(sheetComparisonsRoute.GET, { path: `/api/sheets/${sheetId}/comparisons`, params: { sheetId }, identity: outsider })).status).toBe(404);
  });

  it('gives the report each log\'s newest comparison with a revision, without plot series, and leaves out logs never compared with it', async () => {
    const database = await getDatabase();
    const older = await compared(cleanLogId, { mapping, revision: 1 });
    const newer = await compared(cleanLogId, { mapping, revision: 1 });
    const uncompared = await upload(logText(run), 'zz-never-compared.csv');
    const rows = await latestComparisonsOfRevision(database, sheetId, 1);
    const forClean = rows.filter((row) => row.uploadId === cleanLogId);
    expect(forClean).toHaveLength(1);
    expect(forClean[0]!.id).toBe(newer.id);
    expect(forClean[0]!.id).not.toBe(older.id);
    expect(forClean[0]!.result.joints).toEqual(newer.result!.joints);
    expect(forClean[0]!.result.verdict).toEqual(newer.result!.verdict);
    expect('series' in forClean[0]!.result).toBe(false);
    expect(rows.some((row) => row.uploadId === uncompared)).toBe(false);
    expect(new Set(rows.map((row) => row.uploadId)).size).toBe(rows.length);
    // Revision 2 has its own latest comparisons: the one judged against it earlier in this file fails.
    const second = await latestComparisonsOfRevision(database, sheetId, 2);
    expect(second.find((row) => row.uploadId === cleanLogId)!.result.verdict.withinTolerance).toBe(false);
  });
});
