import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { gunzipSync } from 'node:zlib';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDatabase, openDatabase, type Database } from '../../../src/db';
import { sheets, uploads } from '../../../src/db/schema';
import { createResult, createScene, runSheet, setJointAngles, setObjectPose, solveScene } from '../../../src/lib/kinematics/index';
import { compareLog } from '../../../src/lib/logs/compare';
import { parseLogMapping } from '../../../src/lib/logs/mapping';
import { DEMO_LOG_MAPPINGS_FOLDER, DEMO_LOGS, DEMO_SHEETS_FOLDER, demoLogMapping } from '../../../src/lib/server/demo';
import { diskLogStorage, type LogStorage } from '../../../src/lib/server/log-storage';
import { seedDemoData } from '../../../src/lib/server/seed';
import { checkDocument } from '../../../src/lib/server/sheets';
import { makeTempDir, tempDatabaseUrl } from '../../helpers/temp';

async function bytesOf(stream: Readable): Promise<Uint8Array> {
  const chunks: Uint8Array[] = [];
  for await (const chunk of stream as AsyncIterable<Uint8Array>) chunks.push(chunk);
  const bytes = new Uint8Array(chunks.reduce((size, chunk) => size + chunk.byteLength, 0));
  let offset = 0;
  for (const chunk of chunks) {
    bytes.set(chunk, offset);
    offset += chunk.byteLength;
  }
  return bytes;
}

function sheetOf(file: string) {
  const checked = checkDocument(JSON.parse(readFileSync(join(DEMO_SHEETS_FOLDER, file), 'utf8')));
  if (!checked.ok) throw new Error(checked.error.message);
  return checked.value.doc;
}

function shippedMapping(file: string) {
  const read = parseLogMapping(JSON.parse(readFileSync(join(DEMO_LOG_MAPPINGS_FOLDER, file), 'utf8')));
  if (!read.ok) throw new Error(JSON.stringify(read.issues));
  return read.mapping;
}

let database: Database;
let storage: LogStorage;
let storedLogs: { fileName: string; text: string }[] = [];

beforeAll(async () => {
  database = await openDatabase(tempDatabaseUrl());
  await migrateDatabase(database);
  storage = diskLogStorage(makeTempDir('slipless-demo-logs-'));
});

afterAll(() => database.close());

describe('demo controller logs', () => {
  it('are stored at seed time like uploads: a row on each demo sheet, bytes readable through the log storage, SHA-256 matching', async () => {
    const outcome = await seedDemoData(database, DEMO_SHEETS_FOLDER, storage);
    expect(outcome).toMatchObject({ seeded: true, logs: DEMO_LOGS.length });
    const rows = await database.db.select({ upload: uploads, sheetTitle: sheets.title }).from(uploads).leftJoin(sheets, eq(sheets.id, uploads.sheetId));
    expect(rows.map((r) => r.upload.fileName).sort()).toEqual(DEMO_LOGS.map((log) => log.fileName).sort());
    for (const log of DEMO_LOGS) {
      const { upload, sheetTitle } = rows.find((r) => r.upload.fileName === log.fileName)!;
      expect(sheetTitle).toBe(sheetOf(log.sheetFile).title);
      const bytes = await bytesOf(await storage.get(upload.storageKey));
      expect(bytes.byteLength).toBe(upload.byteSize);
      // SHA-256 by node:crypto over the bytes read back (FIPS 180-4), against the row's digest.
      expect(createHash('sha256').update(bytes).digest('hex')).toBe(upload.sha256);
      // gzip's magic number 1f 8b (RFC 1952, section 2.3.1) on the compressed log only.
      expect(upload.contentType).toBe(log.gzip ? 'application/gzip' : 'text/csv');
      expect(bytes[0] === 0x1f && bytes[1] === 0x8b).toBe(log.gzip);
      storedLogs.push({ fileName: log.fileName, text: new TextDecoder().decode(log.gzip ? new Uint8Array(gunzipSync(bytes)) : bytes) });
    }
  });

  it('are not stored again when the seed runs on the seeded database', async () => {
    const again = await seedDemoData(database, DEMO_SHEETS_FOLDER, storage);
    expect(again).toMatchObject({ seeded: false, logs: 0 });
    expect(await database.db.select().from(uploads)).toHaveLength(DEMO_LOGS.length);
  });

  it('ship mappings that are valid and map every joint of their sheet', () => {
    for (const log of DEMO_LOGS) {
      const doc = sheetOf(log.sheetFile);
      const mapping = shippedMapping(log.mappingFile);
      expect(mapping.joints.map((j) => j.joint)).toEqual(doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name)));
      expect(JSON.parse(readFileSync(join(DEMO_LOG_MAPPINGS_FOLDER, log.mappingFile), 'utf8'))).toEqual(demoLogMapping(doc));
    }
  });

  it('compare within tolerance for the log the controller followed', async () => {
    const log = DEMO_LOGS.find((l) => l.faults.length === 0)!;
    const stored = storedLogs.find((s) => s.fileName === log.fileName)!;
    const result = await compareLog(sheetOf(log.sheetFile), shippedMapping(log.mappingFile), stored.text);
    if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
    expect(result.value.verdict, result.value.verdict.reasons.join('\n')).toMatchObject({ withinTolerance: true });
  });

  it('find the injected slip event and commanded-rate fault at their stated times, RMS within 1 % of the injected value', async () => {
    const log = DEMO_LOGS.find((l) => l.faults.length > 0)!;
    const doc = sheetOf(log.sheetFile);
    const stored = storedLogs.find((s) => s.fileName === log.fileName)!;
    const result = await compareLog(doc, shippedMapping(log.mappingFile), stored.text);
    if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
    const comparison = result.value;
    expect(comparison.verdict.withinTolerance).toBe(false);
    const dt = doc.motion.run.dt;
    for (const fault of log.faults) {
      const [jointName, logged] = fault.column.split('.') as [string, string];
      if (logged === 'commanded') {
        const joint = comparison.joints.find((j) => j.joint === jointName)!;
        expect(joint.intervals).toHaveLength(1);
        const [interval] = joint.intervals;
        expect(interval!.from).toBeCloseTo(fault.from, 6);
        expect(interval!.to).toBeCloseTo(fault.to, 6);
        // A constant offset a on top of zero-mean noise of deviation s has RMS sqrt(a^2 + s^2) (definition of RMS): within 1 % of a here.
        expect(Math.abs(interval!.rms - fault.amount) / fault.amount).toBeLessThan(0.01);
      } else {
        // Extra roll rate delta slides the roller's rim over the object at delta * r (rim speed v = omega r, textbook kinematics).
        const finger = doc.hand.fingers.find((f) => f.joints.some((j) => j.name === jointName))!;
        const contact = comparison.contacts.find((c) => c.finger === finger.name)!;
        expect(contact.intervals).toHaveLength(1);
        const [interval] = contact.intervals;
        expect(interval!.from).toBeCloseTo(fault.from, 6);
        expect(interval!.to).toBeCloseTo(fault.to, 6);
        expect(interval!.samples).toBe(Math.round((fault.to - fault.from) / dt) + 1);
        // The expected RMS re-solves the sheet's own run at the fault's ticks for the rim radius r (distance from contact to roll axis).
        const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: log.ticks, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
        const scene = createScene(doc);
        const out = createResult(scene);
        const fingerIndex = doc.hand.fingers.indexOf(finger);
        let sumSquares = 0;
        let count = 0;
        for (let tick = 0; tick < record.tickCount; tick++) {
          const time = record.time[tick]!;
          if (time < fault.from - dt / 2 || time > fault.to + dt / 2) continue;
          setObjectPose(scene, record.position.subarray(3 * tick, 3 * tick + 3), record.orientation.subarray(4 * tick, 4 * tick + 4));
          record.jointCounts.forEach((n, f) => setJointAngles(scene, f, record.jointAngles[f]!.subarray(n * tick, n * tick + n)));
          solveScene(scene, out);
          sumSquares += (fault.amount * out.fingers[fingerIndex]!.contact.rollAxisDistance) ** 2;
          count++;
        }
        const injectedRms = Math.sqrt(sumSquares / count);
        expect(Math.abs(interval!.rms - injectedRms) / injectedRms).toBeLessThan(0.01);
      }
    }
  });
});
