/**
 * The results of a solved sheet as CSV (RFC 4180): one row per finger with the main outputs,
 * each column's SI unit in its name, as the output catalogue names them. Shared by the compute
 * command and the export endpoint so both write the same table.
 */
import type { PlainSheetResult } from '../kinematics';
import type { ComparedSample } from '../logs/compare';
import { OUTPUTS } from './outputs';
import type { CommandedSolution, SheetDocument } from './types';

/** A number as CSV text; NaN marks a value the contact does not have (a line contact's speed), written as an empty cell. */
function numberText(value: number): string {
  return Number.isFinite(value) ? String(value) : Number.isNaN(value) ? '' : value > 0 ? 'Infinity' : '-Infinity';
}

/**
 * Text such as a finger name is the sheet author's; a spreadsheet would run it as a formula when
 * it starts with = + - @ tab or carriage return, so it gets a leading quote (OWASP CSV injection
 * guidance). Numbers are written as numbers, so a negative rate stays a number.
 */
function textCell(value: unknown): string {
  const text = String(value ?? '');
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

function csvCell(value: unknown): string {
  const text = typeof value === 'number' ? numberText(value) : textCell(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** A header and rows as CSV text, quoted where needed, without a trailing newline. */
export function csvTable(header: readonly string[], rows: readonly (readonly unknown[])[]): string {
  return [header, ...rows].map((row) => row.map(csvCell).join(',')).join('\n');
}

/** How a column name says which solution a sheet rate comes from. */
const SOLUTION_COLUMN: Record<CommandedSolution, string> = { 'steer-and-roll': 'steer_and_roll', full: 'full' };

/**
 * The header line of a comparison's per-sample table (with its newline): the log line, time, per
 * compared joint the logged and sheet commanded rates (named by the solution the joint's finger
 * follows, e.g. "north-base.sheet_steer_and_roll_rad_s") and their residual, per finger the slip
 * speed, and the warnings raised; each column's unit in its name.
 */
export function comparedSampleHeader(columns: { joints: readonly string[]; solutions: readonly CommandedSolution[]; fingers: readonly string[] }): string {
  const header = [
    'line', 'time_s',
    ...columns.joints.flatMap((j, c) => [`${j}.logged_rad_s`, `${j}.sheet_${SOLUTION_COLUMN[columns.solutions[c]!]}_rad_s`, `${j}.residual_rad_s`]),
    ...columns.fingers.map((f) => `${f}.slip_m_s`),
    'warnings',
  ];
  return `${csvTable(header, [])}\n`;
}

/** One compared sample as a line of that table (with its newline); a slip not judged is an empty cell. */
export function comparedSampleLine(sample: ComparedSample): string {
  let line = `${sample.line},${numberText(sample.time)}`;
  for (let c = 0; c < sample.logged.length; c++) line += `,${numberText(sample.logged[c]!)},${numberText(sample.sheet[c]!)},${numberText(sample.residual[c]!)}`;
  for (let f = 0; f < sample.slip.length; f++) line += `,${numberText(sample.slip[f]!)}`;
  return `${line},${sample.warnings.join(' ')}\n`;
}

const FINGER_CSV = OUTPUTS.flatMap((output) => (output.csv && 'columns' in output.csv ? [{ output, columns: output.csv.columns }] : []));
const JOINT_CSV = OUTPUTS.flatMap((output) => (output.csv && 'perJoint' in output.csv ? [{ output, column: output.csv.perJoint }] : []));

/** The per-finger columns, from the output catalogue: the finger, its outputs, its warning codes. */
export const FINGER_COLUMNS = ['finger', ...FINGER_CSV.flatMap((entry) => entry.columns), 'warnings'];

/** Numbered columns per joint (full-solution rates) and per base joint (steer-and-roll base rates), blank past a finger's count. */
export function rateColumns(maxJoints: number): string[] {
  return JOINT_CSV.flatMap((entry) => Array.from({ length: maxJoints }, (_, k) => entry.column(k)));
}

/** One row per finger: FINGER_COLUMNS then the full-solution joint rates, after `prefix`. */
export function fingerRows(result: PlainSheetResult, maxJoints: number, prefix: readonly unknown[] = []): unknown[][] {
  return result.fingers.map((finger, i) => {
    const codes = result.warnings.filter((w) => w.finger === i).map((w) => w.code);
    const values = FINGER_CSV.flatMap(({ output, columns }) => {
      const value = output.read(result, i);
      return typeof value === 'object' ? columns.map((_, k) => value[k]) : [value];
    });
    const perJoint = JOINT_CSV.flatMap(({ output }) => {
      const value = output.read(result, i);
      return Array.from({ length: maxJoints }, (_, k) => (typeof value === 'object' ? (value[k] ?? '') : ''));
    });
    return [...prefix, finger.name, ...values, codes.join(' '), ...perJoint];
  });
}

/** Largest joint count of any finger: the number of rate columns. */
export function maxJointCount(doc: SheetDocument): number {
  return doc.hand.fingers.reduce((n, f) => Math.max(n, f.joints.length), 0);
}

/** The per-finger results table of a solved sheet. */
export function resultsCsv(doc: SheetDocument, result: PlainSheetResult): string {
  const maxJoints = maxJointCount(doc);
  return csvTable([...FINGER_COLUMNS, ...rateColumns(maxJoints)], fingerRows(result, maxJoints));
}
