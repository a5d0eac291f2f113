import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { afterAll, describe, expect, it } from 'vitest';
import { runComputeCommand } from '../../../src/cli/compute';
import { runSheet } from '../../../src/lib/kinematics';
import { SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../../../src/lib/safety';
import { parseSheet } from '../../../src/lib/sheet/schema';

// Conventions checked (common practice): exit status 0 on success, 1 on bad input, 2 on bad usage;
// CSV by RFC 4180 (read back with papaparse, a reference reader); JSON Lines one JSON value per line (jsonlines.org).

const root = fileURLToPath(new URL('../../../', import.meta.url));
const scratch = mkdtempSync(join(tmpdir(), 'compute-matrix-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const peg = JSON.parse(readFileSync(join(root, 'content/sheets/line4-peg-tilt.json'), 'utf8'));
const withMatrix = {
  ...peg,
  matrix: {
    targets: [
      { orientation: { axis: [1, 0, 0], angle: '20 deg' }, group: 'tilt' },
      { orientation: { axis: [1, 0, 0], angle: '-20 deg' }, group: 'tilt' },
      { orientation: { axis: [0, 0, 1], angle: '15 deg' }, group: 'turn' },
    ],
    generators: [{ kind: 'random', count: 2, seed: 5 }],
  },
};
const sheetFile = join(scratch, 'peg-matrix.json');
writeFileSync(sheetFile, JSON.stringify(withMatrix));
const plainFile = join(scratch, 'peg.json');
writeFileSync(plainFile, JSON.stringify(peg));

async function compute(...args: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await runComputeCommand(args, { stdout: (text) => (stdout += text), stderr: (text) => (stderr += text) });
  return { code, stdout, stderr };
}

interface PrintedRun {
  index: number;
  group: string;
  outcome: string;
  ticks: number;
  finalError: number | null;
  targetOrientation: { w: number; x: number; y: number; z: number };
}

describe('npm run compute -- sheet.json --matrix', () => {
  it('prints every run of the matrix and the caution as JSON, and per-group means that are the arithmetic means of the runs', async () => {
    const { code, stdout, stderr } = await compute(sheetFile, '--matrix');
    expect(code).toBe(0);
    expect(stderr).toContain(SAFETY_CAUTION_TEXT);
    const printed = JSON.parse(stdout);
    expect(printed.safety).toBe(SAFETY_CAUTION_TEXT);
    const runs = printed.matrix.runs as PrintedRun[];
    expect(runs.map((r) => r.group)).toEqual(['tilt', 'tilt', 'turn', 'random, seed 5', 'random, seed 5']);
    const tilt = runs.filter((r) => r.group === 'tilt').map((r) => r.finalError!);
    expect(printed.matrix.groups[0].finalError.mean).toBeNear((tilt[0]! + tilt[1]!) / 2, { rel: 1e-14 });
  });

  it('prints CSV with the safety comment first, one row per run and one per group, the sd by the n - 1 formula', async () => {
    const { code, stdout } = await compute(sheetFile, '--matrix', '--format', 'csv');
    expect(code).toBe(0);
    const lines = stdout.split('\n');
    expect(lines[0]).toBe(SAFETY_CSV_COMMENT);
    const [runsText, groupsText] = stdout.split('\n\n# groups\n');
    const runs = Papa.parse<Record<string, string>>(runsText!.split('\n').slice(2).join('\n'), { header: true }).data;
    const groups = Papa.parse<Record<string, string>>(groupsText!.trim(), { header: true }).data;
    expect(runs.length).toBe(5);
    expect(groups.map((g) => g.group)).toEqual(['tilt', 'turn', 'random, seed 5']);
    const random = runs.filter((r) => r.group === 'random, seed 5').map((r) => Number(r.final_error_phi6_rad));
    const mean = (random[0]! + random[1]!) / 2;
    const sd = Math.sqrt(((random[0]! - mean) ** 2 + (random[1]! - mean) ** 2) / (2 - 1));
    expect(Number(groups[2]!.final_error_sd_rad)).toBeNear(sd, { rel: 1e-12 });
    expect(groups[1]!.final_error_sd_rad).toBe('');
  });

  it('writes a JSON Lines data set: a metadata line with the caution, then one row per tick whose rates are those of the plain run', async () => {
    const dataset = join(scratch, 'out.jsonl');
    const { code, stdout } = await compute(sheetFile, '--dataset', dataset);
    expect(code).toBe(0);
    const runs = JSON.parse(stdout).matrix.runs as PrintedRun[];
    const lines = readFileSync(dataset, 'utf8').trimEnd().split('\n').map((line) => JSON.parse(line));
    const { metadata } = lines[0];
    expect(metadata.safety).toBe(SAFETY_CAUTION_TEXT);
    const rows = lines.slice(1);
    expect(rows.length).toBe(runs.reduce((sum, r) => sum + r.ticks, 0));
    expect(Object.keys(rows[0])).toEqual(metadata.columns.map((c: { name: string }) => c.name));

    // The third run checked against a plain run toward the same target, read independently of the data set.
    const parsed = parseSheet(withMatrix);
    if (!parsed.ok) throw new Error('sheet');
    const doc = parsed.doc;
    doc.motion.target.orientation = runs[2]!.targetOrientation;
    const record = runSheet(doc);
    const third = rows.filter((row) => row.run === 2);
    expect(third.length).toBe(record.tickCount);
    const k = Math.floor(record.tickCount / 2);
    expect(third[k].time_s).toBeNear(k * doc.motion.run.dt, { rel: 1e-12 });
    expect(third[k]['left.left-pivot.rate_rad_s']).toBe(record.jointRates[0]![3 * k + 1]);
    expect(third[k]['right.right-roll.angle_rad']).toBe(record.jointAngles[1]![3 * k + 2]);
    expect([third[k].object_qw, third[k].object_qx]).toEqual([record.orientation[4 * k + 3], record.orientation[4 * k]]);
    expect(third[0].target_qw).toBe(runs[2]!.targetOrientation.w);
  });

  it('writes a CSV data set with the caution as its first line and the same columns as the JSON Lines metadata', async () => {
    const csvFile = join(scratch, 'out.csv');
    const jsonlFile = join(scratch, 'again.jsonl');
    expect((await compute(sheetFile, '--dataset', csvFile, '--format', 'csv')).code).toBe(0);
    expect((await compute(sheetFile, '--dataset', jsonlFile)).code).toBe(0);
    const text = readFileSync(csvFile, 'utf8');
    expect(text.split('\n')[0]).toBe(SAFETY_CSV_COMMENT);
    const table = Papa.parse<string[]>(text.split('\n').slice(1).join('\n').trim());
    const jsonl = readFileSync(jsonlFile, 'utf8').trimEnd().split('\n');
    expect(table.data[0]).toEqual(JSON.parse(jsonl[0]!).metadata.columns.map((c: { name: string }) => c.name));
    expect(table.data.length - 1).toBe(jsonl.length - 1);
    expect(new Set(table.data.map((row) => row.length)).size).toBe(1);
  });

  it('refuses a sheet without a matrix (1), and a data set of another type or --matrix with --run (2)', async () => {
    const none = await compute(plainFile, '--matrix');
    expect(none.code).toBe(1);
    expect(none.stderr).toContain('matrix: --matrix needs a "matrix" section');
    expect((await compute(sheetFile, '--dataset', join(scratch, 'out.txt'))).code).toBe(2);
    expect((await compute(sheetFile, '--matrix', '--run')).code).toBe(2);
    expect((await compute(sheetFile, '--dataset')).code).toBe(2);
  });
});
