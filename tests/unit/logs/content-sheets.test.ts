/**
 * Every example sheet shipped in content/sheets: a log written from the sheet's own run, without
 * faults, compares within tolerance (the comparison's requirement: the controller did what the
 * sheet says). Two runs per sheet: the run as the sheet states it (it stops at the target or on
 * a singular warning), and the same run carried on for a fixed length regardless, as the demo
 * logs are written, so that steering starts, the sheet's own required slip and the ends of the
 * log are all crossed.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createResult, createScene, runSheet, setJointAngles, setObjectPose, solveScene, type RunRecord } from '../../../src/lib/kinematics/index';
import { compareLog, type LogComparison } from '../../../src/lib/logs/compare';
import { runLogCsv, runLogMapping } from '../../../src/lib/logs/generate';
import { parseLogMapping } from '../../../src/lib/logs/mapping';
import { DEMO_SHEETS_FOLDER } from '../../../src/lib/server/demo';
import { parseSheet } from '../../../src/lib/sheet/schema';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { TOLERANCES } from './generated-log';

const files = readdirSync(DEMO_SHEETS_FOLDER).filter((name) => name.endsWith('.json')).sort();
const CARRIED_ON_TICKS = 400;

function sheetOf(file: string): SheetDocument {
  const read = parseSheet(JSON.parse(readFileSync(join(DEMO_SHEETS_FOLDER, file), 'utf8')));
  if (!read.ok) throw new Error(`${file}: ${JSON.stringify(read.issues)}`);
  return read.doc;
}

async function compareOwnRun(doc: SheetDocument, record: RunRecord): Promise<LogComparison> {
  const mapping = parseLogMapping(runLogMapping(doc, TOLERANCES));
  if (!mapping.ok) throw new Error(JSON.stringify(mapping.issues));
  const result = await compareLog(doc, mapping.mapping, runLogCsv(doc, record));
  if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
  return result.value;
}

/** The sheet's run settings without pose noise: differentiated noise is slip the log cannot tell from real slip (see below). */
function quiet(doc: SheetDocument): SheetDocument {
  const { noise: _noise, ...run } = doc.motion.run;
  return { ...doc, motion: { ...doc.motion, run } };
}

describe('a log written from each example sheet\'s own run passes the comparison', () => {
  it('has example sheets to check', () => {
    expect(files.length).toBeGreaterThan(0);
  });

  for (const file of files) {
    it(`${file}: the run as the sheet states it`, async () => {
      const doc = quiet(sheetOf(file));
      const record = runSheet(doc);
      const result = await compareOwnRun(doc, record);
      expect(result.samples).toBe(record.tickCount);
      expect(result.verdict.withinTolerance, result.verdict.reasons.join('\n')).toBe(true);
    });

    it(`${file}: the same run carried on for ${CARRIED_ON_TICKS} ticks`, async () => {
      const doc = quiet(sheetOf(file));
      const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: CARRIED_ON_TICKS, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
      const result = await compareOwnRun(doc, record);
      expect(result.samples).toBe(CARRIED_ON_TICKS);
      expect(result.verdict.withinTolerance, result.verdict.reasons.join('\n')).toBe(true);
      // The log holds the rates the run computed, so the re-solve at the logged state gives them back to rounding.
      for (const joint of result.joints) expect(joint.max, joint.joint).toBeLessThan(1e-6);
      for (const contact of result.contacts) expect(contact.max, contact.finger).toBeLessThan(result.tolerances.slip);
    });
  }
});

describe('a sheet whose own solution requires slip', () => {
  it('passes with the sheet\'s slip named in the reasons (retrofit finger: roll axis on the pivot line, so it cannot steer)', async () => {
    const doc = sheetOf('line4-retrofit-finger-review.json');
    const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: CARRIED_ON_TICKS, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
    const result = await compareOwnRun(doc, record);
    expect(result.verdict.withinTolerance).toBe(true);
    expect(result.warnings.map((w) => w.code)).toContain('SLIP_REQUIRED');
    expect(result.verdict.reasons.join('\n')).toContain('the sheet itself requires slip (SLIP_REQUIRED)');
  });

  it('still finds slip added on top of the sheet\'s own: a measured base rate 0.5 rad/s off, RMS within 1 % of the rigid-body speed it adds', async () => {
    const doc = sheetOf('line4-retrofit-finger-review.json');
    const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: CARRIED_ON_TICKS, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
    const f = doc.hand.fingers.findIndex((finger) => finger.name === 'southeast');
    const b = doc.hand.fingers[f]!.joints.findIndex((joint) => joint.role === 'base');
    const base = doc.hand.fingers[f]!.joints[b]!;
    const delta = 0.5;
    const lines = runLogCsv(doc, record).trimEnd().split('\n');
    const column = lines[0]!.split(',').indexOf(`${base.name}.measured`);
    const text = lines.map((line, i) => {
      if (i === 0) return line;
      const cells = line.split(',');
      cells[column] = String(Number(cells[column]) + delta);
      return cells.join(',');
    }).join('\n');
    const mapping = parseLogMapping(runLogMapping(doc, TOLERANCES));
    if (!mapping.ok) throw new Error(JSON.stringify(mapping.issues));
    const result = await compareLog(doc, mapping.mapping, text);
    if (!result.ok) throw new Error(JSON.stringify(result.error.issues));
    // Turning about the base axis (unit w through point r) at delta moves the roller's contact point y at
    // delta w x (y - r) (rigid-body rotation, textbook kinematics); its tangential part is slip on top of the sheet's own.
    const scene = createScene(doc);
    const out = createResult(scene);
    let sumSquares = 0;
    for (let tick = 0; tick < record.tickCount; tick++) {
      setObjectPose(scene, record.position.subarray(3 * tick, 3 * tick + 3), record.orientation.subarray(4 * tick, 4 * tick + 4));
      record.jointCounts.forEach((n, k) => setJointAngles(scene, k, record.jointAngles[k]!.subarray(n * tick, n * tick + n)));
      solveScene(scene, out);
      const finger = out.fingers[f]!, y = finger.contact.rollerPoint, n = finger.contact.normal;
      const w = finger.jointAxes.subarray(3 * b, 3 * b + 3), r = finger.jointPoints.subarray(3 * b, 3 * b + 3);
      const e = [y[0]! - r[0]!, y[1]! - r[1]!, y[2]! - r[2]!];
      const v = [delta * (w[1]! * e[2]! - w[2]! * e[1]!), delta * (w[2]! * e[0]! - w[0]! * e[2]!), delta * (w[0]! * e[1]! - w[1]! * e[0]!)];
      const along = v[0]! * n[0]! + v[1]! * n[1]! + v[2]! * n[2]!;
      sumSquares += (v[0]! - along * n[0]!) ** 2 + (v[1]! - along * n[1]!) ** 2 + (v[2]! - along * n[2]!) ** 2;
    }
    const expectedRms = Math.sqrt(sumSquares / record.tickCount);
    expect(result.value.verdict.withinTolerance).toBe(false);
    expect(Math.abs(result.value.contacts[f]!.rms - expectedRms) / expectedRms).toBeLessThan(0.01);
  });
});

describe('a sheet whose run measures the pose with noise', () => {
  it('compares its commanded rates exactly: the log holds the pose the controller measured and acted on', async () => {
    const noisy = files.map(sheetOf).filter((doc) => doc.motion.run.noise !== undefined);
    expect(noisy.length).toBeGreaterThan(0);
    for (const doc of noisy) {
      const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: CARRIED_ON_TICKS, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
      const result = await compareOwnRun(doc, record);
      for (const joint of result.joints) expect(joint.max, joint.joint).toBeLessThan(1e-6);
    }
  });
});
