/**
 * Runs and sweeps as export files, one builder for the browser's downloads and the compute command: a table of named
 * columns with their SI units (time or swept value, object pose, per finger per joint the angle and the commanded rate,
 * per finger the solution it followed and the slip speed left at its contact, the warnings), written as CSV after
 * comment lines (safety caution, sheet, units) or as JSON carrying the same. A leaf module the browser may import.
 */
import { SOLUTION_KINDS, warningsAt, type PlainSheetResult, type RunRecord, type SweepRecord } from '../kinematics';
import { SAFETY_CAUTION_TEXT, SAFETY_CSV_COMMENT } from '../safety';
import { describeCommanded, sweptCommandedRates } from './commanded';
import { csvTable } from './results-csv';
import { RESULT_CONVENTIONS } from './results-json';
import { commandedSolutionOf } from './sheet-constants';
import type { CommandedSolution, SheetDocument } from './types';
import { siUnitAt } from '../view/sweep-inputs';

/** One column: its name, SI unit ('1' dimensionless, '' for text), the finger and joint it belongs to, and a value per row. */
export interface ExportColumn {
  name: string;
  unit: string;
  finger?: string;
  joint?: string;
  values: Float64Array | string[];
}

/** A run or a sweep as named columns, one row per time step or swept value. */
export interface ExportTable {
  kind: 'run' | 'sweep';
  /** The sheet's commanded solution, and in words the rates the fingers followed. */
  solution: CommandedSolution;
  followed: string;
  /** What the rows are, in one line, e.g. "run: converged after 412 time steps of 0.005 s". */
  description: string;
  rowCount: number;
  columns: ExportColumn[];
}

/** Which stored sheet the export came from; the compute command reads a file and has neither id nor revision. */
export interface ExportSource {
  sheetId: string | null;
  title: string;
  revision: number | null;
  /** The sheet page ran the document as edited, before saving it as a new revision. */
  unsaved?: boolean;
}

/** The JSON export: what the file is, where it came from, its units and caution, then columns and rows (null for a value that is not a finite number). */
export interface ExportJson {
  format: 'slipless.export';
  version: 1;
  kind: 'run' | 'sweep';
  sheet: { id: string | null; title: string; revision: number | null; unsavedChanges: boolean };
  description: string;
  solution: CommandedSolution;
  followed: string;
  units: 'SI';
  conventions: typeof RESULT_CONVENTIONS;
  safety: string;
  columns: { name: string; unit: string; finger?: string; joint?: string }[];
  rows: (number | string | null)[][];
}

const POSE_AXES = ['x', 'y', 'z'] as const;
const QUATERNION_PARTS = ['w', 'x', 'y', 'z'] as const;
/** Where each named part sits in the core's [x, y, z, w] quaternion. */
const QUATERNION_OFFSET = { w: 3, x: 0, y: 1, z: 2 } as const;

function numbers(name: string, unit: string, rows: number, read: (row: number) => number, owner: { finger?: string; joint?: string } = {}): ExportColumn {
  // A plain loop: Float64Array.from with a mapping function costs several times more on a long run, which the worker builds after every run.
  const values = new Float64Array(rows);
  for (let i = 0; i < rows; i++) values[i] = read(i);
  return { name, unit, ...owner, values };
}

/** The object pose columns: origin x, y, z (m) and orientation w, x, y, z, from a reader of the origin and the [x, y, z, w] quaternion. */
function poseColumns(rows: number, position: (row: number, axis: number) => number, orientation: (row: number, offset: number) => number): ExportColumn[] {
  return [
    ...POSE_AXES.map((axis, a) => numbers(`position ${axis}`, 'm', rows, (i) => position(i, a))),
    ...QUATERNION_PARTS.map((part) => numbers(`orientation ${part}`, '1', rows, (i) => orientation(i, QUATERNION_OFFSET[part]))),
  ];
}

interface FingerReaders {
  angle: (row: number, joint: number) => number;
  rate: (row: number, joint: number) => number;
  solution: (row: number) => string;
  slip: (row: number) => number;
}

/** Per finger: every joint's angle (rad), every joint's commanded rate (rad/s), the solution followed and the slip speed left (m/s). */
function fingerColumns(doc: SheetDocument, rows: number, readers: (finger: number) => FingerReaders): ExportColumn[] {
  return doc.hand.fingers.flatMap((finger, f) => {
    const read = readers(f);
    const joints = finger.joints.map((joint) => joint.name);
    const owner = (joint: string) => ({ finger: finger.name, joint });
    return [
      ...joints.map((joint, k) => numbers(`${finger.name}/${joint} angle`, 'rad', rows, (i) => read.angle(i, k), owner(joint))),
      ...joints.map((joint, k) => numbers(`${finger.name}/${joint} rate`, 'rad/s', rows, (i) => read.rate(i, k), owner(joint))),
      { name: `${finger.name} solution`, unit: '', finger: finger.name, values: Array.from({ length: rows }, (_, i) => read.solution(i)) },
      numbers(`${finger.name} slip residual`, 'm/s', rows, read.slip, { finger: finger.name }),
    ];
  });
}

/** Each time step's warning codes joined by ";"; a run repeats few masks, so each is spelled out once. */
function warningTexts(record: RunRecord): string[] {
  const texts = new Map<number, string>();
  return Array.from(record.warningMask.subarray(0, record.tickCount), (mask, i) => {
    let text = texts.get(mask);
    if (text === undefined) texts.set(mask, (text = warningsAt(record, i).join(';')));
    return text;
  });
}

/** A run record as an export table: one row per time step, the rates each finger followed (a steered pivot's change over the step). */
export function runExportTable(doc: SheetDocument, record: RunRecord): ExportTable {
  const n = record.tickCount;
  const fingerCount = record.fingerNames.length;
  const commanded = commandedSolutionOf(doc);
  const solutionAt = (i: number, f: number) => SOLUTION_KINDS[record.solution[fingerCount * i + f]!]!;
  const followed = record.fingerNames.map((finger, f) => ({ finger, solution: n === 0 ? commanded : solutionAt(0, f) }));
  const columns: ExportColumn[] = [
    numbers('time', 's', n, (i) => record.time[i]!),
    ...poseColumns(n, (i, a) => record.position[3 * i + a]!, (i, o) => record.orientation[4 * i + o]!),
    ...fingerColumns(doc, n, (f) => {
      const width = record.jointCounts[f]!;
      return {
        angle: (i, k) => record.jointAngles[f]![width * i + k]!,
        rate: (i, k) => record.jointRates[f]![width * i + k]!,
        solution: (i) => solutionAt(i, f),
        slip: (i) => record.slipResidual[fingerCount * i + f]!,
      };
    }),
    { name: 'warnings', unit: '', values: warningTexts(record) },
  ];
  return {
    kind: 'run',
    solution: commanded,
    followed: describeCommanded(commanded, followed),
    description: `run: ${record.stopReason} after ${n} time steps of ${record.settings.dt} s`,
    rowCount: n,
    columns,
  };
}

/** The slip speed left by the solution a finger follows (m/s): after steering under steer-and-roll, else the full solution's residual. */
export function followedSlip(result: PlainSheetResult, finger: number, solution: CommandedSolution): number {
  const solved = result.fingers[finger]!;
  return solution === 'steer-and-roll' ? solved.steer.residualNorm : solved.full.residualNorm;
}

/** A sweep record as an export table: one row per swept value, with the rates the sheet commands at that value. */
export function sweepExportTable(doc: SheetDocument, record: SweepRecord): ExportTable {
  const n = record.results.length;
  const commanded = record.results.map((result, i) => sweptCommandedRates(doc, result, record.path, record.values[i]!));
  const chosen = commandedSolutionOf(doc);
  const columns: ExportColumn[] = [
    numbers(record.path, siUnitAt(record.path), n, (i) => record.values[i]!),
    ...poseColumns(n, (i, a) => record.results[i]!.object.position[a]!, (i, o) => record.results[i]!.object.orientation[o]!),
    ...fingerColumns(doc, n, (f) => ({
      angle: (i, k) => record.results[i]!.fingers[f]!.jointAngles[k]!,
      rate: (i, k) => commanded[i]!.fingers[f]!.joints[k]!.rate,
      solution: (i) => commanded[i]!.fingers[f]!.solution,
      slip: (i) => followedSlip(record.results[i]!, f, commanded[i]!.fingers[f]!.solution),
    })),
    { name: 'warnings', unit: '', values: record.results.map((result) => [...new Set(result.warnings.map((w) => w.code))].join(';')) },
  ];
  return {
    kind: 'sweep',
    solution: chosen,
    followed: describeCommanded(chosen, commanded[0]?.fingers ?? []),
    description: `sweep: ${n} values of ${record.path}`,
    rowCount: n,
    columns,
  };
}

/** A column's header in the CSV: its name and, for numbers, its unit in brackets. */
export function columnHeader(column: Pick<ExportColumn, 'name' | 'unit'>): string {
  return column.unit === '' ? column.name : `${column.name} [${column.unit}]`;
}

/** Row i of the table; a number that is not finite becomes `missing`, so no export carries NaN or Infinity. */
function row<M>(table: ExportTable, i: number, missing: M): (number | string | M)[] {
  return table.columns.map((column) => {
    const value = column.values[i]!;
    return typeof value === 'number' && !Number.isFinite(value) ? missing : value;
  });
}

/** Text a person typed, on one comment line: line breaks become spaces. */
const oneLine = (text: string) => text.replace(/[\r\n]+/g, ' ');

function sheetLine(source: ExportSource): string {
  const stored =
    source.sheetId === null
      ? 'not a stored sheet (read from a file)'
      : `id ${source.sheetId}, rev ${source.revision ?? '?'}${source.unsaved ? ' with unsaved changes' : ''}`;
  return `sheet: "${oneLine(source.title)}", ${stored}`;
}

/** The table as a CSV file: comment lines (safety caution, sheet, what the rows are, units and conventions), the header, one line per row. */
export function exportCsv(table: ExportTable, source: ExportSource): string {
  const comments = [
    SAFETY_CSV_COMMENT,
    `# ${sheetLine(source)}`,
    `# ${table.description}; joint rates followed: ${oneLine(table.followed)}`,
    `# units: SI (m, rad, s); ${RESULT_CONVENTIONS.frame}; quaternion ${RESULT_CONVENTIONS.quaternion}; warnings: codes joined by ";"`,
  ];
  const rows = Array.from({ length: table.rowCount }, (_, i) => row(table, i, ''));
  return `${comments.join('\n')}\n${csvTable(table.columns.map(columnHeader), rows)}\n`;
}

/** The table as the JSON export's value. */
export function exportJsonValue(table: ExportTable, source: ExportSource): ExportJson {
  return {
    format: 'slipless.export',
    version: 1,
    kind: table.kind,
    sheet: { id: source.sheetId, title: source.title, revision: source.revision, unsavedChanges: source.unsaved === true },
    description: table.description,
    solution: table.solution,
    followed: table.followed,
    units: 'SI',
    conventions: RESULT_CONVENTIONS,
    safety: SAFETY_CAUTION_TEXT,
    columns: table.columns.map(({ name, unit, finger, joint }) => ({ name, unit, ...(finger !== undefined ? { finger } : {}), ...(joint !== undefined ? { joint } : {}) })),
    rows: Array.from({ length: table.rowCount }, (_, i) => row(table, i, null)),
  };
}

/** The table as a JSON file, written compact: a long run has tens of thousands of rows. */
export function exportJson(table: ExportTable, source: ExportSource): string {
  return `${JSON.stringify(exportJsonValue(table, source))}\n`;
}

/** A plain file name for a revision's download, e.g. "peg-tilt-about-the-grip-line-r3.json", or "...-r3-run.csv" for a run. */
export function exportFileName(title: string, revision: number, extension: 'json' | 'csv', kind?: 'run' | 'sweep'): string {
  const slug = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80);
  return `${slug || 'sheet'}-r${revision}${kind ? `-${kind}` : ''}.${extension}`;
}
