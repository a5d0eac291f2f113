/**
 * Solves a sheet document from the command line.
 * Usage: npm run compute -- path/to/sheet.json [--format json|csv] [--run | --sweep]
 *        npm run compute -- path/to/sheet.json --matrix [--dataset out.jsonl|out.csv] [--format json|csv]
 *        npm run compute -- path/to/sheet.json --log log.csv[.gz] --mapping mapping.json [--format json|csv]
 * JSON (default) prints {title, result}; CSV prints one row per finger. With --run (or --sweep) it
 * prints instead the run (or sweep) export, the same file the sheet page's Export CSV / Export JSON
 * buttons download: one row per time step (or swept value) with the object pose, every joint's angle
 * and commanded rate, each finger's solution and slip residual, and the warnings.
 * Exit codes: 0 solved, 1 unreadable or invalid sheet, 2 bad usage.
 * With --log the controller log is compared with the sheet (streamed; a name ending in .gz is
 * decompressed): JSON prints the comparison (per joint, per contact, warnings, verdict), CSV the
 * per-sample table; exit codes 0 within tolerance, 3 outside, 1 bad sheet, mapping or log, 2 bad usage.
 * With --matrix the sheet's test matrix runs and its result alone is printed (JSON, or CSV: runs, then
 * groups); --dataset (implies --matrix) also writes every tick of every run as a state-action data set.
 */
import { createReadStream, realpathSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { createGunzip } from 'node:zlib';
import { runSheet, sweepSheet, type SweepRecord } from '../lib/kinematics';
import { compareLog, describeComparisonError, type ComparedSample } from '../lib/logs/compare';
import { comparisonReportJson, verdictExitCode } from '../lib/logs/report';
import { evaluateSheet, type SheetEvaluation } from '../lib/sheet/evaluate';
import { comparedSampleHeader, comparedSampleLine, resultsCsv } from '../lib/sheet/results-csv';
import { exportedResult } from '../lib/sheet/results-json';
import { exportCsv, exportJson, runExportTable, sweepExportTable, type ExportTable } from '../lib/sheet/run-export';
import { commandedSolutionOf } from '../lib/sheet/schema';
import { SAFETY_CAUTION, SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../lib/safety';
import { InputError, readJsonFile, readMappingFile } from './input-files';
import { computeMatrix, DATASET_EXTENSIONS, matrixOutput } from './matrix-output';

const USAGE = 'usage: npm run compute -- path/to/sheet.json [--format json|csv] [--run | --sweep] [--matrix [--dataset out.jsonl|out.csv]] [--log log.csv[.gz] --mapping mapping.json]';

interface Options {
  file: string;
  format: 'json' | 'csv';
  run: boolean;
  sweep: boolean;
  log?: string;
  mapping?: string;
  matrix: boolean;
  dataset?: string;
}

class UsageError extends Error {}

function parseArguments(args: readonly string[]): Options {
  let file: string | undefined;
  let format: Options['format'] = 'json';
  let run = false;
  let sweep = false;
  let log: string | undefined;
  let mapping: string | undefined;
  let matrix = false;
  let dataset: string | undefined;
  for (let i = 0; i < args.length; i++) {
    const arg = args[i]!;
    if (arg === '--run') run = true;
    else if (arg === '--matrix') matrix = true;
    else if (arg === '--dataset') {
      dataset = args[++i];
      if (dataset === undefined || dataset.startsWith('--')) throw new UsageError('--dataset needs a file name');
      if (!DATASET_EXTENSIONS.some((ext) => dataset!.endsWith(ext))) throw new UsageError(`--dataset writes ${DATASET_EXTENSIONS.join(' or ')} files, got ${dataset}`);
      matrix = true;
    }
    else if (arg === '--log' || arg === '--mapping') {
      const value = args[++i];
      if (value === undefined || value.startsWith('--')) throw new UsageError(`${arg} needs a file name`);
      if (arg === '--log') log = value;
      else mapping = value;
    }
    else if (arg === '--sweep') sweep = true;
    else if (arg === '--format' || arg.startsWith('--format=')) {
      const value = arg === '--format' ? args[++i] : arg.slice('--format='.length);
      if (value !== 'json' && value !== 'csv') throw new UsageError(`--format must be json or csv, got ${value ?? 'nothing'}`);
      format = value;
    } else if (arg === '--help' || arg === '-h') throw new UsageError('');
    else if (arg.startsWith('-')) throw new UsageError(`unknown option ${arg}`);
    else if (file === undefined) file = arg;
    else throw new UsageError(`only one sheet file, got ${file} and ${arg}`);
  }
  if (file === undefined) throw new UsageError('no sheet file given');
  if ((log === undefined) !== (mapping === undefined)) throw new UsageError('--log and --mapping go together');
  if (log !== undefined && (run || sweep || matrix)) throw new UsageError('--log compares a log; it does not combine with --run, --sweep or --matrix');
  if (matrix && (run || sweep)) throw new UsageError('--matrix prints the matrix alone; it does not combine with --run or --sweep');
  if (run && sweep) throw new UsageError('--run and --sweep each write one export file; give one of them');
  return { file, format, run, sweep, matrix, ...(dataset !== undefined ? { dataset } : {}), ...(log !== undefined ? { log, mapping } : {}) };
}

function evaluateFile(file: string): SheetEvaluation {
  const evaluated = evaluateSheet(readJsonFile(file));
  if (!evaluated.ok) {
    const { issues, stage } = evaluated.error;
    const lines = issues.map((issue) => `${file}: ${issue.path}: ${issue.message}`);
    const verdict = stage === 'solve' ? 'the sheet could not be solved' : `invalid sheet (${issues.length} issue${issues.length === 1 ? '' : 's'})`;
    throw new InputError(`${lines.join('\n')}\n${file}: ${verdict}`);
  }
  return evaluated.value;
}

/** Where the command writes; the process streams when run from the shell. */
export interface CommandOutput {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

/** Compares the log with the sheet and prints the comparison (JSON) or the per-sample table (CSV), streaming the table as it goes. */
async function compareCommand(options: Options & { log: string; mapping: string }, evaluation: SheetEvaluation, io: CommandOutput): Promise<number> {
  const { mapping } = readMappingFile(options.mapping);
  const stream = createReadStream(options.log);
  const opened = await new Promise<NodeJS.ErrnoException | null>((resolve) => {
    stream.once('open', () => resolve(null));
    stream.once('error', (error) => resolve(error));
  });
  if (opened) throw new InputError(`${options.log}: cannot read the file (${opened.code ?? String(opened)})`);
  const source = options.log.endsWith('.gz') ? stream.pipe(createGunzip()) : stream;
  // Text decoded by the stream keeps a character split between two chunks whole.
  source.setEncoding('utf8');
  const csv = options.format === 'csv';
  let buffered: string[] = [];
  const flush = () => {
    io.stdout(buffered.join(''));
    buffered = [];
  };
  let compared;
  try {
    compared = await compareLog(evaluation.doc, mapping, source, {
      // The table carries joint rates toward a controller: the caution travels inside the file too, as the server's export does.
      onColumns: csv ? (columns) => buffered.push(`${SAFETY_CSV_COMMENT}\n${comparedSampleHeader(columns)}`) : undefined,
      onSample: csv
        ? (sample: ComparedSample) => {
            buffered.push(comparedSampleLine(sample));
            if (buffered.length >= 1000) flush();
          }
        : undefined,
    });
  } catch (error) {
    throw new InputError(`${options.log}: cannot read the log (${error instanceof Error ? error.message : String(error)})`);
  }
  if (!compared.ok) {
    const file = compared.error.stage === 'mapping' ? options.mapping : options.log;
    const lines = describeComparisonError(compared.error).map((line) => `${file}: ${line.replace(/^mapping: /, '')}`);
    throw new InputError(`${lines.join('\n')}\n${file}: ${compared.error.stage === 'mapping' ? 'the mapping does not fit the sheet' : 'bad log'}`);
  }
  const comparison = compared.value;
  if (csv) flush();
  else io.stdout(comparisonReportJson(evaluation.doc.title, comparison));
  return verdictExitCode(comparison);
}

/** Runs the compute command on its arguments and resolves to the exit status (0 solved or within tolerance, 1 bad input, 2 bad usage, 3 outside tolerance). */
export async function runComputeCommand(args: readonly string[], io: CommandOutput): Promise<number> {
  const report = (text: string) => io.stderr(`${text}\n`);
  let options: Options;
  try {
    options = parseArguments(args);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    if (error.message) report(`compute: ${error.message}`);
    report(USAGE);
    return 2;
  }
  let evaluation: SheetEvaluation;
  try {
    evaluation = evaluateFile(options.file);
  } catch (error) {
    if (!(error instanceof InputError)) throw error;
    report(error.message);
    return 1;
  }
  if (options.log !== undefined && options.mapping !== undefined) {
    try {
      return await compareCommand({ ...options, log: options.log, mapping: options.mapping }, evaluation, io);
    } catch (error) {
      if (!(error instanceof InputError)) throw error;
      report(error.message);
      return 1;
    }
  }
  const { doc, result } = evaluation;
  if (options.matrix) {
    if (doc.matrix === undefined) {
      report(`${options.file}: matrix: --matrix needs a "matrix" section in the sheet`);
      return 1;
    }
    report(SAFETY_CAUTION);
    try {
      io.stdout(matrixOutput(doc.title, computeMatrix(doc, options.dataset), options.format, SAFETY_CAUTION_TEXT));
    } catch (error) {
      if (!(error instanceof InputError)) throw error;
      report(error.message);
      return 1;
    }
    return 0;
  }
  if (options.sweep && doc.sweep === undefined) {
    report(`${options.file}: sweep: --sweep needs a "sweep" section in the sheet`);
    return 1;
  }
  let sweep: SweepRecord | undefined;
  try {
    sweep = options.sweep ? sweepSheet(doc) : undefined;
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    report(`${options.file}: sweep.path: ${error.message}`);
    return 1;
  }
  const table: ExportTable | undefined = options.run ? runExportTable(doc, runSheet(doc)) : sweep ? sweepExportTable(doc, sweep) : undefined;
  // The output carries joint rates toward a controller: the caution goes to standard error, where a pipe does not swallow it.
  report(SAFETY_CAUTION);
  if (table) {
    // A sheet read from a file has no id or revision; otherwise the very file the sheet page downloads.
    const source = { sheetId: null, title: doc.title, revision: null };
    io.stdout(options.format === 'json' ? exportJson(table, source) : exportCsv(table, source));
    return 0;
  }
  if (options.format === 'json') {
    const output = { title: doc.title, safety: SAFETY_CAUTION_TEXT, commanded: commandedSolutionOf(doc), result: exportedResult(doc, result) };
    // JSON has no Infinity or NaN; they are written as strings so nothing is silently lost.
    io.stdout(`${JSON.stringify(output, (_, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v), 2)}\n`);
    return 0;
  }
  // The caution also travels inside the file, as a comment line, so it stays with the table once the pipe is saved.
  io.stdout(`${SAFETY_CSV_COMMENT}\n${resultsCsv(doc, result)}\n`);
  return 0;
}

const invokedDirectly = process.argv[1] !== undefined && realpathSync(process.argv[1]) === realpathSync(fileURLToPath(import.meta.url));
if (invokedDirectly) {
  process.exitCode = await runComputeCommand(process.argv.slice(2), {
    stdout: (text) => process.stdout.write(text),
    stderr: (text) => process.stderr.write(text),
  });
}
