import { Readable } from 'node:stream';
import { createGunzip, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { createResult, createScene, quat, setJointAngles, setObjectPose, solveScene } from '../../../src/lib/kinematics/index';
import { compareLog, type LogComparison } from '../../../src/lib/logs/compare';
import { parseLogMapping } from '../../../src/lib/logs/mapping';
import { generatedRun, logText } from './generated-log';

const run = generatedRun(600);
const { doc, record, mapping, header } = run;
const dt = doc.motion.run.dt;

async function compared(text: string | NodeJS.ReadableStream, map = mapping): Promise<LogComparison> {
  const result = await compareLog(doc, map, text);
  if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
  return result.value;
}

const column = (name: string) => header.indexOf(name);
// Ticks 200 to 299 of the 5 ms run: t = 1.000 s to 1.495 s.
const FAULT_FROM = 200, FAULT_TO = 299;
const inFault = (tick: number) => tick >= FAULT_FROM && tick <= FAULT_TO;

describe('comparison of a log written from the sheet\'s own run', () => {
  it('passes: every commanded rate matches the re-solved sheet and no contact slips', async () => {
    const result = await compared(logText(run));
    expect(result.samples).toBe(record.tickCount);
    expect(result.verdict.withinTolerance).toBe(true);
    expect(result.joints.map((j) => j.joint)).toEqual(doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name)));
    // The log holds the run's own numbers, so the re-solve at the logged state gives them back to rounding.
    for (const joint of result.joints) {
      expect(joint.max, joint.joint).toBeLessThan(1e-9);
      expect(joint.withinFraction).toBe(1);
    }
    for (const contact of result.contacts) {
      expect(contact.computed).toBe(true);
      expect(contact.max, contact.finger).toBeLessThan(mapping.tolerances.slip);
    }
  });

  it('reads the same log gzip-compressed through node:zlib as plain text', async () => {
    const text = logText(run);
    const stream = Readable.from([gzipSync(text)]).pipe(createGunzip());
    stream.setEncoding('utf8');
    const [plain, gzipped] = await Promise.all([compared(text), compared(stream)]);
    expect({ ...gzipped, series: null }).toEqual({ ...plain, series: null });
  });

  it('reads angles in degrees and rates in rpm as the same log in radians (1 rpm = 2 pi / 60 rad/s, definition)', async () => {
    const converted = logText(run, (row) => {
      header.forEach((name, i) => {
        if (name.endsWith('.angle')) row[i] = (row[i]! * 180) / Math.PI;
        else if (name.endsWith('.commanded') || name.endsWith('.measured')) row[i] = (row[i]! * 60) / (2 * Math.PI);
      });
    });
    const raw = JSON.parse(JSON.stringify((await import('../../../src/lib/logs/generate')).runLogMapping(doc, { rate: '0.05 rad/s', slip: '1 mm/s' })));
    for (const entry of raw.joints) {
      entry.angle.unit = 'deg';
      entry.commandedRate.unit = 'rpm';
      entry.measuredRate.unit = 'rpm';
    }
    const read = parseLogMapping(raw);
    expect(read.ok).toBe(true);
    if (!read.ok) return;
    const result = await compared(converted, read.mapping);
    expect(result.verdict.withinTolerance).toBe(true);
    for (const joint of result.joints) expect(joint.max).toBeLessThan(1e-9);
  });
});

describe('comparison of a log with injected faults', () => {
  it('finds a commanded-rate offset on one joint at the right times with its RMS within 1 %', async () => {
    const offset = 0.2;
    const faulty = 'southwest-roll';
    const result = await compared(logText(run, (row, tick) => {
      if (inFault(tick)) row[column(`${faulty}.commanded`)]! += offset;
    }));
    expect(result.verdict.withinTolerance).toBe(false);
    expect(result.verdict.reasons.join('\n')).toContain(`joint "${faulty}"`);
    const joint = result.joints.find((j) => j.joint === faulty)!;
    expect(joint.intervals).toHaveLength(1);
    const [interval] = joint.intervals;
    expect(interval!.from).toBeCloseTo(FAULT_FROM * dt, 12);
    expect(interval!.to).toBeCloseTo(FAULT_TO * dt, 12);
    expect(interval!.samples).toBe(FAULT_TO - FAULT_FROM + 1);
    expect(Math.abs(interval!.rms - offset) / offset).toBeLessThan(0.01);
    // Over the whole log the RMS of an offset on a share s of the samples is offset * sqrt(s) (definition of RMS).
    const share = (FAULT_TO - FAULT_FROM + 1) / record.tickCount;
    expect(Math.abs(joint.rms - offset * Math.sqrt(share)) / (offset * Math.sqrt(share))).toBeLessThan(0.01);
    expect(joint.withinFraction).toBeCloseTo(1 - share, 12);
    for (const other of result.joints.filter((j) => j.joint !== faulty)) expect(other.intervals).toEqual([]);
    for (const contact of result.contacts) expect(contact.intervals, 'a commanded rate alone does not make slip').toEqual([]);
  });

  it('finds a slip event at one contact at the right times with its RMS within 1 % of the rim speed', async () => {
    // The roll joint turns delta faster than the motion needs: the roller's rim then slides over the object at
    // delta * r, r the distance from the contact to the roll axis (rim speed v = omega r, textbook kinematics).
    const delta = 4;
    const finger = 'north';
    const fingerIndex = doc.hand.fingers.findIndex((f) => f.name === finger);
    const result = await compared(logText(run, (row, tick) => {
      if (inFault(tick)) row[column(`${finger}-roll.measured`)]! += delta;
    }));
    const scene = createScene(doc);
    const out = createResult(scene);
    let sumSquares = 0;
    for (let tick = FAULT_FROM; tick <= FAULT_TO; tick++) {
      setObjectPose(scene, record.position.subarray(3 * tick, 3 * tick + 3), record.orientation.subarray(4 * tick, 4 * tick + 4));
      record.jointCounts.forEach((n, f) => setJointAngles(scene, f, record.jointAngles[f]!.subarray(n * tick, n * tick + n)));
      solveScene(scene, out);
      sumSquares += (delta * out.fingers[fingerIndex]!.contact.rollAxisDistance) ** 2;
    }
    const expectedRms = Math.sqrt(sumSquares / (FAULT_TO - FAULT_FROM + 1));
    expect(result.verdict.withinTolerance).toBe(false);
    expect(result.verdict.reasons.join('\n')).toContain(`finger "${finger}"`);
    const contact = result.contacts[fingerIndex]!;
    expect(contact.intervals).toHaveLength(1);
    const [interval] = contact.intervals;
    expect(interval!.from).toBeCloseTo(FAULT_FROM * dt, 12);
    expect(interval!.to).toBeCloseTo(FAULT_TO * dt, 12);
    expect(Math.abs(interval!.rms - expectedRms) / expectedRms).toBeLessThan(0.01);
    expect(contact.maxAt).toBeGreaterThanOrEqual(FAULT_FROM * dt);
    expect(contact.maxAt).toBeLessThanOrEqual(FAULT_TO * dt);
    for (const other of result.contacts.filter((c) => c.finger !== finger)) expect(other.intervals).toEqual([]);
    for (const joint of result.joints) expect(joint.intervals, 'a measured rate does not change the commanded comparison').toEqual([]);
  });

  it('keeps the injected peak in the decimated plot series, however few buckets', async () => {
    const result = await compareLog(doc, mapping, logText(run, (row, tick) => {
      if (tick === 377) row[column('southeast-base.commanded')]! += 1.5;
    }), { plotBuckets: 16 });
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    const series = result.value.series;
    const residual = series.labels.indexOf('southeast-base residual');
    expect(series.from.length).toBeLessThanOrEqual(16);
    expect(Math.max(...series.max[residual]!)).toBeCloseTo(1.5, 9);
    const bucket = series.max[residual]!.findIndex((v) => v > 1);
    expect(series.from[bucket]).toBeLessThanOrEqual(377 * dt);
    expect(series.to[bucket]).toBeGreaterThanOrEqual(377 * dt);
    expect(series.from[0]).toBe(0);
    expect(series.to[series.to.length - 1]).toBeCloseTo((record.tickCount - 1) * dt, 12);
  });

  it('uses the logged wanted twist instead of the run law when it is mapped', async () => {
    const withTwist = ['vx', 'vy', 'vz', 'wx', 'wy', 'wz'];
    const twistRun = { ...run, header: [...header, ...withTwist] };
    // A wanted twist of zero: the sheet then commands no motion, so every logged nonzero rate differs.
    const text = logText(twistRun, (row) => row.push(0, 0, 0, 0, 0, 0));
    const raw = { ...JSON.parse(JSON.stringify((await import('../../../src/lib/logs/generate')).runLogMapping(doc, { rate: '0.05 rad/s', slip: '1 mm/s' }))), wantedTwist: { linear: { columns: withTwist.slice(0, 3), unit: 'm/s' }, angular: { columns: withTwist.slice(3), unit: 'rad/s' } } };
    const read = parseLogMapping(raw);
    expect(read.ok).toBe(true);
    if (!read.ok) return;
    const result = await compared(text, read.mapping);
    const roll = result.joints.find((j) => j.joint === 'north-roll')!;
    let largest = 0;
    const n = record.jointCounts[0]!;
    for (let tick = 0; tick < record.tickCount; tick++) largest = Math.max(largest, Math.abs(record.jointRates[0]![n * tick + 2]!));
    expect(roll.max).toBeCloseTo(largest, 9);
  });
});

describe('warnings during a comparison', () => {
  it('lists each warning raised by the re-solved sheet with the times it was active', async () => {
    const result = await compared(logText(run));
    const scene = createScene(doc);
    const out = createResult(scene);
    setObjectPose(scene, record.position.subarray(0, 3), quat.normalize(record.orientation.subarray(0, 4)));
    solveScene(scene, out);
    for (const warning of out.warnings) {
      const activity = result.warnings.find((w) => w.code === warning.code);
      expect(activity, warning.code).toBeDefined();
      expect(activity!.intervals[0]!.from).toBe(0);
    }
  });
});
