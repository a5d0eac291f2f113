import { execFile } from 'node:child_process';
import { SAFETY_CAUTION, SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../../../src/lib/safety';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { runComputeCommand } from '../../../src/cli/compute';
import { runSheet, sweepSheet } from '../../../src/lib/kinematics';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { exportCsv, exportJson, runExportTable, sweepExportTable } from '../../../src/lib/sheet/run-export';
import { runLogMapping } from '../../../src/lib/logs/generate';
import { generatedRun, TOLERANCES, writeLogFiles } from '../logs/generated-log';

// Conventions checked (common practice): exit status 0 on success, 1 on bad input, 2 on bad usage (as in
// GNU grep/diff); CSV rows of equal width with RFC 4180 quoting; error messages located as file:line:column.

const root = fileURLToPath(new URL('../../../', import.meta.url));
const tsx = join(root, 'node_modules', '.bin', 'tsx');
const sheetsDir = join(root, 'content', 'sheets');
const sheets = readdirSync(sheetsDir).filter((name) => name.endsWith('.json')).sort();
const scratch = mkdtempSync(join(tmpdir(), 'compute-cli-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

/** The command in this process (fast); `spawned` runs the real script through tsx. */
async function compute(...args: string[]): Promise<Outcome> {
  let stdout = '';
  let stderr = '';
  const code = await runComputeCommand(args, { stdout: (text) => (stdout += text), stderr: (text) => (stderr += text) });
  return { code, stdout, stderr };
}

function spawned(...args: string[]): Promise<Outcome> {
  return new Promise((resolve) => {
    execFile(tsx, ['src/cli/compute.ts', ...args], { cwd: root, maxBuffer: 256 * 1024 * 1024 }, (error, stdout, stderr) => {
      resolve({ code: error ? Number(error.code ?? 1) : 0, stdout, stderr });
    });
  });
}

/** Splits one CSV line by RFC 4180 rules (quoted fields may hold commas and doubled quotes). */
function csvFields(line: string): string[] {
  const fields: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i]!;
    if (quoted) {
      if (ch === '"' && line[i + 1] === '"') {
        field += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      fields.push(field);
      field = '';
    } else field += ch;
  }
  fields.push(field);
  return fields;
}

describe('compute CLI', () => {
  it('finds the example sheets', () => {
    expect(sheets.length).toBeGreaterThan(0);
  });

  it('solves every example sheet to JSON with one result per finger', async () => {
    const outcomes = await Promise.all(sheets.map((name) => compute(join('content', 'sheets', name))));
    outcomes.forEach((outcome, i) => {
      const source = JSON.parse(readFileSync(join(sheetsDir, sheets[i]!), 'utf8')) as { title: string; hand: { fingers: unknown[] } };
      // Only the safety caution on standard error: the output carries joint rates (wording from src/lib/safety.ts).
      expect(outcome.stderr, sheets[i]).toBe(`${SAFETY_CAUTION}\n`);
      expect(outcome.code, sheets[i]).toBe(0);
      const output = JSON.parse(outcome.stdout) as { title: string; safety: string; result: { fingers: { full: { rates: number[] } }[]; warnings: unknown[] } };
      expect(output.safety).toBe(SAFETY_CAUTION_TEXT);
      expect(output.title).toBe(source.title);
      expect(output.result.fingers.length).toBe(source.hand.fingers.length);
      expect(Array.isArray(output.result.warnings)).toBe(true);
    });
  });

  it('prints CSV with a header and one row per finger, every row as wide as the header', async () => {
    const outcomes = await Promise.all(sheets.map((name) => compute(join('content', 'sheets', name), '--format', 'csv')));
    outcomes.forEach((outcome, i) => {
      const source = JSON.parse(readFileSync(join(sheetsDir, sheets[i]!), 'utf8')) as { hand: { fingers: { name: string }[] } };
      expect(outcome.code, sheets[i]).toBe(0);
      const [safety, ...lines] = outcome.stdout.trimEnd().split('\n');
      // The safety caution travels inside the CSV as its first, comment line, as the server's CSV exports write it.
      expect(safety).toBe(SAFETY_CSV_COMMENT);
      expect(lines.length).toBe(source.hand.fingers.length + 1);
      const width = csvFields(lines[0]!).length;
      lines.forEach((line) => expect(csvFields(line).length).toBe(width));
      expect(lines.slice(1).map((line) => csvFields(line)[0])).toEqual(source.hand.fingers.map((f) => f.name));
    });
  });

  it('prints the run and the sweep exports the builder writes, byte for byte (JSON and CSV)', async () => {
    const withSweep = sheets.find((name) => 'sweep' in (JSON.parse(readFileSync(join(sheetsDir, name), 'utf8')) as object));
    expect(withSweep).toBeDefined();
    const file = join('content', 'sheets', withSweep!);
    const evaluated = evaluateSheet(JSON.parse(readFileSync(file, 'utf8')));
    if (!evaluated.ok) throw new Error('the demo sheet does not read');
    const doc = evaluated.value.doc;
    const source = { sheetId: null, title: doc.title, revision: null };
    const runTable = runExportTable(doc, runSheet(doc));
    const sweepTable = sweepExportTable(doc, sweepSheet(doc));
    const [runJson, runCsv, sweepJson, sweepCsv] = await Promise.all([
      compute(file, '--run'), compute(file, '--format=csv', '--run'), compute(file, '--sweep'), compute(file, '--format', 'csv', '--sweep'),
    ]);
    for (const outcome of [runJson, runCsv, sweepJson, sweepCsv]) {
      expect(outcome.code).toBe(0);
      expect(outcome.stderr).toBe(`${SAFETY_CAUTION}\n`);
    }
    expect(runJson.stdout).toBe(exportJson(runTable, source));
    expect(runCsv.stdout).toBe(exportCsv(runTable, source));
    expect(sweepJson.stdout).toBe(exportJson(sweepTable, source));
    expect(sweepCsv.stdout).toBe(exportCsv(sweepTable, source));
    // Rows of equal width (RFC 4180) under the comment lines, one per time step.
    const lines = runCsv.stdout.trimEnd().split('\n').filter((line) => !line.startsWith('#'));
    expect(lines.length).toBe(1 + runTable.rowCount);
    lines.forEach((line) => expect(csvFields(line).length).toBe(runTable.columns.length));
  });

  it('refuses --run with --sweep (bad usage, exit 2): each writes one export file', async () => {
    const outcome = await compute(join('content', 'sheets', sheets[0]!), '--run', '--sweep');
    expect(outcome.code).toBe(2);
    expect(outcome.stdout).toBe('');
    expect(outcome.stderr).toContain('--run and --sweep');
  });

  it('exits 1 with file:line:column on invalid JSON', async () => {
    const file = join(scratch, 'broken.json');
    writeFileSync(file, '{\n  "format": "slipless.sheet",\n  "title": "a" "b"\n}\n');
    const outcome = await compute(file);
    expect(outcome.code).toBe(1);
    expect(outcome.stdout).toBe('');
    expect(outcome.stderr).toContain(`${file}:3:16: invalid JSON`);
  });

  it('exits 1 listing each invalid field by its path', async () => {
    const source = JSON.parse(readFileSync(join(sheetsDir, sheets[0]!), 'utf8')) as { hand: { fingers: { joints: { axis: unknown }[] }[] } };
    source.hand.fingers[0]!.joints[0]!.axis = 'sideways';
    const file = join(scratch, 'invalid.json');
    writeFileSync(file, JSON.stringify(source));
    const outcome = await compute(file);
    expect(outcome.code).toBe(1);
    expect(outcome.stderr).toContain(`${file}: hand.fingers[0].joints[0].axis: `);
    expect(outcome.stderr).toMatch(/invalid sheet \(1 issue\)/);
  });

  it('runs as a script: solved sheet on stdout with status 0, invalid JSON on stderr with status 1', { timeout: 180_000 }, async () => {
    const broken = join(scratch, 'broken-spawned.json');
    writeFileSync(broken, '{ "format": ');
    const [good, bad] = [await spawned(join('content', 'sheets', sheets[0]!), '--format', 'csv'), await spawned(broken)];
    expect(good.code).toBe(0);
    expect(good.stdout.split('\n')[0]).toBe(SAFETY_CSV_COMMENT);
    expect(good.stdout.split('\n')[1]).toMatch(/^finger,contact_state,gap_m,/);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain(`${broken}:1:13: invalid JSON`);
  });

  it('exits 1 on a missing file and 2 on bad usage', async () => {
    const [missing, unknown, format, none] = await Promise.all([
      compute(join(scratch, 'nope.json')),
      compute(join('content', 'sheets', sheets[0]!), '--bogus'),
      compute(join('content', 'sheets', sheets[0]!), '--format', 'xml'),
      compute(),
    ]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toContain('cannot read the file (ENOENT)');
    for (const outcome of [unknown, format, none]) {
      expect(outcome.code).toBe(2);
      expect(outcome.stderr).toContain('usage: npm run compute');
    }
  });
});

describe('compute CLI at the edges of the inputs', () => {
  it('reports a NaN literal at its own line and column, not at the end of the file', async () => {
    const file = join(scratch, 'nan.json');
    writeFileSync(file, '{\n  "format": "slipless.sheet",\n  "damping": NaN,\n  "title": "a"\n}\n');
    const outcome = await compute(file);
    expect(outcome.code).toBe(1);
    expect(outcome.stderr).toContain(`${file}:3:14: invalid JSON`);
  });

  it('exits 1 on an angular speed of 1e308 rad/s instead of printing NaN rates', async () => {
    const source = JSON.parse(readFileSync(join(sheetsDir, 'line4-peg-tilt.json'), 'utf8')) as { object: { twist: { angular: unknown[] } } };
    source.object.twist.angular[0] = 1e308;
    const file = join(scratch, 'huge-spin.json');
    writeFileSync(file, JSON.stringify(source));
    const outcome = await compute(file);
    expect(outcome.code).toBe(1);
    expect(outcome.stdout).toBe('');
    expect(outcome.stderr).toContain(`${file}: object.twist.angular[0]: `);
  });
});

describe('compute CLI comparing a controller log (--log, --mapping)', () => {
  // Exit status 0 within tolerance and 3 outside, as a CI gate reads it (issue #12); 1 for bad input.
  const run = generatedRun(300);
  const { sheetFile, mappingFile, cleanLog, faultyLog, badLog } = writeLogFiles(scratch, run);

  it('prints the comparison as JSON and exits 0 for a log within tolerance', async () => {
    const outcome = await compute(sheetFile, '--log', cleanLog, '--mapping', mappingFile);
    expect(outcome.stderr).toBe('');
    expect(outcome.code).toBe(0);
    const { comparison } = JSON.parse(outcome.stdout) as { comparison: { joints: { joint: string; rms: number; max: number; maxAt: number; withinFraction: number }[]; contacts: unknown[]; verdict: { withinTolerance: boolean } } };
    expect(comparison.verdict.withinTolerance).toBe(true);
    expect(comparison.joints.map((j) => j.joint)).toEqual(run.doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name)));
    for (const entry of comparison.joints) expect(Object.keys(entry)).toEqual(expect.arrayContaining(['joint', 'rms', 'max', 'maxAt', 'withinFraction']));
    expect(comparison.contacts).toHaveLength(run.doc.hand.fingers.length);
  });

  it('exits 3 with the faulty joint in the verdict for a gzip log outside tolerance', async () => {
    const outcome = await compute(sheetFile, '--log', faultyLog, '--mapping', mappingFile);
    expect(outcome.code).toBe(3);
    const { comparison } = JSON.parse(outcome.stdout) as { comparison: { verdict: { withinTolerance: boolean; reasons: string[] } } };
    expect(comparison.verdict.withinTolerance).toBe(false);
    expect(comparison.verdict.reasons[0]).toContain('joint "north-base"');
  });

  it('prints the per-sample table with --format csv, one row per sample, every row as wide as the header', async () => {
    const outcome = await compute(sheetFile, '--log', cleanLog, '--mapping', mappingFile, '--format', 'csv');
    expect(outcome.code).toBe(0);
    const [safety, ...lines] = outcome.stdout.trimEnd().split('\n');
    expect(safety).toBe(SAFETY_CSV_COMMENT);
    expect(lines.length).toBe(run.record.tickCount + 1);
    const width = csvFields(lines[0]!).length;
    lines.forEach((line) => expect(csvFields(line).length).toBe(width));
    expect(lines[0]).toMatch(/^line,time_s,north-base\.logged_rad_s,north-base\.sheet_steer_and_roll_rad_s,north-base\.residual_rad_s,/);
  });

  it('exits 1 locating a bad cell in the log, and a mapping naming a joint the sheet lacks', async () => {
    const bad = await compute(sheetFile, '--log', badLog, '--mapping', mappingFile);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toContain(`${badLog}: line 4, column 1 ("t"): expected a time (a decimal number), found "zero"`);
    const wrongJoint = join(scratch, 'wrong-joint.json');
    const mapping = runLogMapping(run.doc, TOLERANCES);
    mapping.joints[0]!.joint = 'wrist';
    writeFileSync(wrongJoint, JSON.stringify(mapping));
    const unknown = await compute(sheetFile, '--log', cleanLog, '--mapping', wrongJoint);
    expect(unknown.code).toBe(1);
    expect(unknown.stderr).toContain(`${wrongJoint}: joints[0].joint: the sheet has no joint named "wrist"`);
  });

  it('exits 1 on a missing log and 2 on --log without --mapping', async () => {
    const [missing, alone] = await Promise.all([
      compute(sheetFile, '--log', join(scratch, 'nope.csv'), '--mapping', mappingFile),
      compute(sheetFile, '--log', cleanLog),
    ]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toContain('cannot read the file (ENOENT)');
    expect(alone.code).toBe(2);
  });
});
