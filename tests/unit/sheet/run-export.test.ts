import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { glMatrix, quat as glQuat } from 'gl-matrix';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { createResult, createScene, runSheet, setJointAngles, setObjectPose, setObjectTwist, solveScene, sweepSheet } from '../../../src/lib/kinematics';
import { SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../../../src/lib/safety';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import {
  columnHeader, exportCsv, exportFileName, exportJson, exportJsonValue, runExportTable, sweepExportTable, type ExportColumn, type ExportTable,
} from '../../../src/lib/sheet/run-export';
import type { SheetDocument } from '../../../src/lib/sheet/types';

// gl-matrix computes in Float32Array unless told otherwise; the check needs doubles.
glMatrix.setMatrixArrayType(Array);

const sheetsDir = fileURLToPath(new URL('../../../content/sheets/', import.meta.url));

function demoSheet(name: string, change: (raw: Record<string, unknown>) => void = () => {}): SheetDocument {
  const raw = JSON.parse(readFileSync(`${sheetsDir}${name}`, 'utf8')) as Record<string, unknown>;
  change(raw);
  const evaluated = evaluateSheet(raw);
  if (!evaluated.ok) throw new Error(`${name} does not read`);
  return evaluated.value.doc;
}

const source = { sheetId: 'sheet-7', title: 'Egg part: roll the seam', revision: 4 };

function columnOf(table: ExportTable, name: string): ExportColumn {
  const found = table.columns.find((c) => c.name === name);
  if (!found) throw new Error(`no column ${name}`);
  return found;
}

const numbersOf = (table: ExportTable, name: string) => columnOf(table, name).values as Float64Array;

/** The object pose error twist the run's controller commands, from gl-matrix (a reference library): dp = target - p, dr = log(q_target q*). */
function poseErrorByGlMatrix(position: number[], orientation: number[], doc: SheetDocument): number[] {
  const target = doc.motion.target;
  const qt = glQuat.fromValues(target.orientation.x, target.orientation.y, target.orientation.z, target.orientation.w);
  const q = glQuat.fromValues(orientation[0]!, orientation[1]!, orientation[2]!, orientation[3]!);
  const delta = glQuat.multiply(glQuat.create(), qt, glQuat.conjugate(glQuat.create(), q));
  // The shorter of the two rotations q and -q describe (common practice for the quaternion log map).
  if (delta[3] < 0) glQuat.scale(delta, delta, -1);
  const axis = [0, 0, 0] as [number, number, number];
  const angle = glQuat.getAxisAngle(axis, delta);
  return [...target.position.map((t, i) => t - position[i]!), ...axis.map((a) => a * angle)];
}

describe('runExportTable', () => {
  const doc = demoSheet('line4-egg-part-seam.json');
  const record = runSheet(doc);
  const table = runExportTable(doc, record);

  it('names every column with its SI unit: time, pose, per finger per joint angle and rate, solution, slip residual, warnings', () => {
    const expected = [
      ['time', 's'],
      ...['x', 'y', 'z'].map((a) => [`position ${a}`, 'm']),
      ...['w', 'x', 'y', 'z'].map((p) => [`orientation ${p}`, '1']),
      ...doc.hand.fingers.flatMap((f) => [
        ...f.joints.map((j) => [`${f.name}/${j.name} angle`, 'rad']),
        ...f.joints.map((j) => [`${f.name}/${j.name} rate`, 'rad/s']),
        [`${f.name} solution`, ''],
        [`${f.name} slip residual`, 'm/s'],
      ]),
      ['warnings', ''],
    ];
    expect(table.columns.map((c) => [c.name, c.unit])).toEqual(expected);
    expect(table.columns.every((c) => c.values.length === record.tickCount)).toBe(true);
    expect(columnHeader(columnOf(table, `${doc.hand.fingers[0]!.name}/${doc.hand.fingers[0]!.joints[0]!.name} rate`))).toMatch(/ rate \[rad\/s\]$/);
  });

  it('keeps the run clock: time = tick × time step (the run advances one time step per row)', () => {
    const time = numbersOf(table, 'time');
    time.forEach((t, i) => expect(t).toBeNear(i * doc.motion.run.dt, { rel: 1e-12 }));
  });

  it('writes unit quaternions, w first (|q| = 1 for a rotation, common practice)', () => {
    const parts = ['w', 'x', 'y', 'z'].map((p) => numbersOf(table, `orientation ${p}`));
    for (let i = 0; i < table.rowCount; i += 37) expect(Math.hypot(...parts.map((c) => c[i]!))).toBeNear(1, { abs: 1e-12 });
    // The run starts at the sheet's pose, written w, x, y, z as the sheet writes it.
    const start = doc.object.pose.orientation;
    expect(parts.map((c) => c[0]!)).toBeNear([start.w, start.x, start.y, start.z], { abs: 1e-15 });
  });

  it('pairs angles with the rates that move them: angle(t + dt) = angle(t) + rate(t) dt (explicit Euler, as the run integrates)', () => {
    const dt = doc.motion.run.dt;
    for (const finger of doc.hand.fingers) {
      for (const joint of finger.joints) {
        const angle = numbersOf(table, `${finger.name}/${joint.name} angle`);
        const rate = numbersOf(table, `${finger.name}/${joint.name} rate`);
        for (let i = 0; i + 1 < table.rowCount; i += 23) expect(angle[i + 1]!).toBeNear(angle[i]! + rate[i]! * dt, { abs: 1e-12, rel: 1e-9 });
      }
    }
  });

  it('gives the rates and slip residual the core solves at the exported pose and angles under the commanded twist gain × pose error', () => {
    // Without sensor noise the controller commands from the true pose, which is the one exported.
    const doc = demoSheet('line4-egg-part-seam.json', (raw) => delete (raw.motion as { run: { noise?: unknown } }).run.noise);
    expect(doc.motion.run.noise).toBeUndefined();
    const table = runExportTable(doc, runSheet(doc));
    const scene = createScene(doc);
    const result = createResult(scene);
    const gain = doc.motion.run.gain;
    for (const tick of [0, Math.floor(table.rowCount / 3), table.rowCount - 1]) {
      const position = ['x', 'y', 'z'].map((a) => numbersOf(table, `position ${a}`)[tick]!);
      const [w, x, y, z] = ['w', 'x', 'y', 'z'].map((p) => numbersOf(table, `orientation ${p}`)[tick]!);
      const orientation = [x!, y!, z!, w!];
      const error = poseErrorByGlMatrix(position, orientation, doc);
      setObjectPose(scene, position, orientation);
      setObjectTwist(scene, error.slice(0, 3).map((e) => gain * e), error.slice(3).map((e) => gain * e));
      doc.hand.fingers.forEach((finger, f) => setJointAngles(scene, f, finger.joints.map((joint) => numbersOf(table, `${finger.name}/${joint.name} angle`)[tick]!)));
      solveScene(scene, result);
      doc.hand.fingers.forEach((finger, f) => {
        const solved = result.fingers[f]!;
        const steered = columnOf(table, `${finger.name} solution`).values[tick] === 'steer-and-roll';
        expect(steered).toBe(solved.steer.available);
        const pivot = finger.joints.findIndex((joint) => joint.role === 'pivot');
        const expectedRates = finger.joints.map((_, k) => (steered ? (k === pivot ? solved.steer.pivotChange / doc.motion.run.dt : solved.steer.rates[k]!) : solved.full.rates[k]!));
        const exportedRates = finger.joints.map((joint) => numbersOf(table, `${finger.name}/${joint.name} rate`)[tick]!);
        expect(exportedRates).toBeNear(expectedRates, { abs: 1e-9, rel: 1e-6 });
        const slip = steered ? solved.steer.residualNorm : solved.full.residualNorm;
        expect(numbersOf(table, `${finger.name} slip residual`)[tick]!).toBeNear(slip, { abs: 1e-12 });
      });
    }
  });

  it('lists each time step\'s warning codes joined by ";", and names the solution the sheet commands', () => {
    const warnings = columnOf(table, 'warnings').values as string[];
    expect(warnings.some((w) => w.includes(';'))).toBe(true);
    for (const cell of warnings) for (const code of cell.split(';').filter(Boolean)) expect(code).toMatch(/^[A-Z_]+$/);
    expect(table.solution).toBe('steer-and-roll');
    const full = demoSheet('line4-egg-part-seam.json', (raw) => (raw.commanded = 'full'));
    const fullTable = runExportTable(full, runSheet(full));
    expect(fullTable.solution).toBe('full');
    expect(full.hand.fingers.every((f) => (columnOf(fullTable, `${f.name} solution`).values as string[]).every((s) => s === 'full'))).toBe(true);
  });
});

describe('sweepExportTable', () => {
  const doc = demoSheet('line4-egg-part-seam.json');
  const sweep = doc.sweep!;
  const table = sweepExportTable(doc, sweepSheet(doc));

  it('names the swept input by its path in its SI unit, one row per value', () => {
    expect(table.columns[0]!.name).toBe(sweep.path);
    expect(table.columns[0]!.unit).toBe('m');
    expect(table.rowCount).toBe(sweep.steps);
    // Evenly spaced from..to inclusive (the sweep's definition).
    expect(Array.from(table.columns[0]!.values as Float64Array)).toBeNear(
      Array.from({ length: sweep.steps }, (_, i) => sweep.from + ((sweep.to - sweep.from) * i) / (sweep.steps - 1)),
      { rel: 1e-12 },
    );
  });

  it('gives, at every value, the angles, commanded rates and slip residual of solving the sheet afresh with that value', () => {
    const tokens = sweep.path.slice(1).split('/');
    for (let i = 0; i < table.rowCount; i++) {
      const changed = structuredClone(doc) as unknown as Record<string, unknown>;
      let holder: Record<string, unknown> = changed;
      for (const token of tokens.slice(0, -1)) holder = holder[token] as Record<string, unknown>;
      holder[tokens.at(-1)!] = (table.columns[0]!.values as Float64Array)[i]!;
      const evaluated = evaluateSheet(changed);
      if (!evaluated.ok) throw new Error('the swept sheet does not read');
      const { result } = evaluated.value;
      doc.hand.fingers.forEach((finger, f) => {
        const commanded = result.commanded!.fingers[f]!;
        finger.joints.forEach((joint, k) => {
          expect(numbersOf(table, `${finger.name}/${joint.name} angle`)[i]!).toBeNear(result.fingers[f]!.jointAngles[k]!, { abs: 1e-15 });
          expect(numbersOf(table, `${finger.name}/${joint.name} rate`)[i]!).toBeNear(commanded.joints[k]!.rate, { abs: 1e-9, rel: 1e-9 });
        });
        expect(columnOf(table, `${finger.name} solution`).values[i]).toBe(commanded.solution);
        const slip = commanded.solution === 'steer-and-roll' ? result.fingers[f]!.steer.residualNorm : result.fingers[f]!.full.residualNorm;
        expect(numbersOf(table, `${finger.name} slip residual`)[i]!).toBeNear(slip, { abs: 1e-12 });
      });
      expect((columnOf(table, 'warnings').values[i] as string).split(';').filter(Boolean)).toEqual([...new Set(result.warnings.map((w) => w.code))]);
    }
  });
});

describe('exportCsv and exportJson', () => {
  const doc = demoSheet('line4-peg-tilt.json');
  const table = runExportTable(doc, runSheet(doc));

  it('opens the CSV with the safety caution, then the sheet id and revision, and the units', () => {
    const lines = exportCsv(table, source).split('\n');
    expect(lines[0]).toBe(SAFETY_CSV_COMMENT);
    expect(lines[1]).toBe('# sheet: "Egg part: roll the seam", id sheet-7, rev 4');
    expect(lines[3]).toMatch(/^# units: SI \(m, rad, s\)/);
    expect(lines[4]).toBe(table.columns.map(columnHeader).join(','));
  });

  it('reads back through papaparse (a reference CSV reader) to the same header and values', () => {
    const parsed = Papa.parse<Record<string, unknown>>(exportCsv(table, source), { comments: '#', header: true, dynamicTyping: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(table.columns.map(columnHeader));
    expect(parsed.data).toHaveLength(table.rowCount);
    for (const column of table.columns) {
      const read = parsed.data.map((row) => row[columnHeader(column)]);
      // String(number) round-trips a double exactly (ECMAScript Number::toString); empty text reads back as null.
      expect(read).toEqual(Array.from(column.values as ArrayLike<number | string>, (v) => (v === '' ? null : v)));
    }
  });

  it('carries the same columns and rows in JSON, with the sheet, SI units and the safety caution', () => {
    const json = JSON.parse(exportJson(table, source)) as ReturnType<typeof exportJsonValue>;
    expect(json.sheet).toEqual({ id: 'sheet-7', title: source.title, revision: 4, unsavedChanges: false });
    expect(json.units).toBe('SI');
    expect(json.safety).toBe(SAFETY_CAUTION_TEXT);
    expect(json.solution).toBe('steer-and-roll');
    expect(json.columns.map((c) => c.name)).toEqual(table.columns.map((c) => c.name));
    expect(json.rows).toHaveLength(table.rowCount);
    expect(json.rows[table.rowCount - 1]).toEqual(table.columns.map((c) => c.values[table.rowCount - 1]));
  });

  it('writes no NaN or Infinity: an empty CSV cell and a JSON null instead', () => {
    const broken: ExportTable = { ...table, rowCount: 2, columns: [{ name: 'time', unit: 's', values: Float64Array.of(Number.NaN, Infinity) }] };
    expect(exportCsv(broken, source).split('\n').slice(-3)).toEqual(['', '', '']);
    expect(exportJsonValue(broken, source).rows).toEqual([[null], [null]]);
  });

  it('keeps a title with line breaks on one comment line, and marks unsaved edits', () => {
    const lines = exportCsv(table, { ...source, title: 'two\nlines', unsaved: true }).split('\n');
    expect(lines[1]).toBe('# sheet: "two lines", id sheet-7, rev 4 with unsaved changes');
    expect(lines[2]!.startsWith('# run: ')).toBe(true);
  });

  it('names the files by sheet title, revision and kind', () => {
    expect(exportFileName('Egg part: roll the seam', 4, 'csv', 'run')).toBe('egg-part-roll-the-seam-r4-run.csv');
    expect(exportFileName('Égal', 2, 'json', 'sweep')).toBe('egal-r2-sweep.json');
  });
});
