/**
 * Comparing two revisions (of one sheet, or of a sheet and a fork): the stored inputs field by
 * field, and the outputs recomputed for both by the kinematics core, number by number.
 */
import type { Database } from '../../db';
import type { Sheet } from '../../db/schema';
import type { PlainSheetResult } from '../kinematics';
import { DEFAULT_DISPLAY_UNITS, displayUnitsOf, type DisplayUnits } from '../sheet/display-units';
import { diffDocuments, isRecord, pathText, type DocumentChangeKind } from '../sheet/document-path';
import { evaluateSheet } from '../sheet/evaluate';
import { describePath } from '../sheet/path-words';
import { fingerOutputs, graspOutputs, type OutputValue, type OutputValueRow } from '../sheet/outputs';
import { formatIssuePath, type SheetIssue } from '../sheet/schema';
import { describeWarning } from '../sheet/warning-notes';
import { getRevision } from './sheets';

export type InputChangeKind = DocumentChangeKind;

/** One difference between two input documents, at a path written like parseSheet's issue paths. */
export interface InputChange {
  path: string;
  kind: InputChangeKind;
  before?: unknown;
  after?: unknown;
}

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

/** Every added, removed and changed value between two JSON documents; arrays are compared index by index. */
export function diffInputs(before: unknown, after: unknown): InputChange[] {
  return diffDocuments(before, after, 'by-index').map((change) => ({ ...change, path: pathText(change.path) }));
}

/** A field of the input shown side by side: a path and its value, where arrays of plain values count as one field. */
export interface InputField {
  path: string;
  /** The path in words ("finger 1 (north) / roller radius"), names from the newer side. */
  label: string;
  before?: Json;
  after?: Json;
  kind: InputChangeKind | 'same';
}

function collectLeaves(value: unknown, path: PropertyKey[], out: Map<string, Json>): void {
  const isLeafArray = Array.isArray(value) && value.every((item) => item === null || typeof item !== 'object');
  if (isRecord(value) && Object.keys(value).length > 0) {
    for (const [key, item] of Object.entries(value)) collectLeaves(item, [...path, key], out);
  } else if (Array.isArray(value) && !isLeafArray && value.length > 0) {
    value.forEach((item, i) => collectLeaves(item, [...path, i], out));
  } else {
    out.set(formatIssuePath(path), value as Json);
  }
}

/** Both documents as one list of fields in document order, each marked same, changed, added or removed. */
export function sideBySide(before: unknown, after: unknown): InputField[] {
  const left = new Map<string, Json>();
  const right = new Map<string, Json>();
  collectLeaves(before, [], left);
  collectLeaves(after, [], right);
  const paths = [...left.keys(), ...[...right.keys()].filter((path) => !left.has(path))];
  return paths.map((path) => {
    const label = describePath(path, right.has(path) ? after : before);
    if (!right.has(path)) return { path, label, before: left.get(path), kind: 'removed' };
    if (!left.has(path)) return { path, label, after: right.get(path), kind: 'added' };
    const a = left.get(path), b = right.get(path);
    return { path, label, before: a, after: b, kind: JSON.stringify(a) === JSON.stringify(b) ? 'same' : 'changed' };
  });
}

/** Differences at or below this (absolute, or relative to the larger value) are rounding, shown as equal. */
export const EQUAL_ABSOLUTE = 1e-12;
export const EQUAL_RELATIVE = 1e-9;
/** A relative difference from this up is highlighted as major; smaller real differences as minor. */
export const MAJOR_RELATIVE = 0.01;

export type DifferenceLevel = 'same' | 'minor' | 'major' | 'one-side';

/** One output number in both revisions with its absolute and relative difference. */
export interface OutputDifference {
  /** Finger name, or "grasp". */
  group: string;
  quantity: string;
  unit: string;
  from: number | string | null;
  to: number | string | null;
  /** to − from, in `unit`; null when a side is missing or not a finite number. */
  absolute: number | null;
  /** (to − from) / |from|; null when from is 0 or either side is missing or not finite. */
  relative: number | null;
  level: DifferenceLevel;
}

function differenceOf(group: string, quantity: string, unit: string, from: OutputValue | null, to: OutputValue | null): OutputDifference {
  const row = { group, quantity, unit, from, to };
  if (from === null || to === null) return { ...row, absolute: null, relative: null, level: 'one-side' };
  if (typeof from === 'string' || typeof to === 'string') {
    return { ...row, absolute: null, relative: null, level: from === to ? 'same' : 'major' };
  }
  if (!Number.isFinite(from) || !Number.isFinite(to)) {
    return { ...row, absolute: null, relative: null, level: Object.is(from, to) ? 'same' : 'major' };
  }
  const absolute = to - from;
  const relative = from === 0 ? (to === 0 ? 0 : null) : absolute / Math.abs(from);
  const rounding = Math.abs(absolute) <= EQUAL_ABSOLUTE + EQUAL_RELATIVE * Math.max(Math.abs(from), Math.abs(to));
  const level: DifferenceLevel = rounding ? 'same' : relative === null || Math.abs(relative) >= MAJOR_RELATIVE ? 'major' : 'minor';
  return { ...row, absolute, relative, level };
}

const byQuantity = (rows: OutputValueRow[]) => new Map(rows.map((row) => [row.quantity, row]));

/** The main outputs of two results side by side; fingers are matched by name. */
export function compareOutputs(from: PlainSheetResult, to: PlainSheetResult): OutputDifference[] {
  const rows: OutputDifference[] = [];
  const names = [...from.fingers.map((f) => f.name), ...to.fingers.map((f) => f.name).filter((n) => !from.fingers.some((f) => f.name === n))];
  for (const name of names) {
    const a = from.fingers.findIndex((f) => f.name === name);
    const b = to.fingers.findIndex((f) => f.name === name);
    const left = byQuantity(a >= 0 ? fingerOutputs(from, a) : []);
    const right = byQuantity(b >= 0 ? fingerOutputs(to, b) : []);
    const keys = [...left.keys(), ...[...right.keys()].filter((key) => !left.has(key))];
    for (const key of keys) {
      const entry = left.get(key) ?? right.get(key)!;
      rows.push(differenceOf(name, entry.quantity, entry.unit, left.get(key)?.value ?? null, right.get(key)?.value ?? null));
    }
  }
  const [fromGrasp, toGrasp] = [graspOutputs(from), graspOutputs(to)];
  fromGrasp.forEach((row, i) => rows.push(differenceOf('grasp', row.quantity, row.unit, row.value, toGrasp[i].value)));
  return rows;
}

/** A warning as compared: its code, severity, where it was raised, what it says, and its value and threshold in the display units. */
export interface ComparedWarning {
  code: string;
  severity: string;
  finger: string | null;
  joint: string | null;
  message: string;
  /** 'finger "index", joint "index-pivot"', or "grasp". */
  where: string;
  /** The judged value with its unit, e.g. "0.4 mm". */
  value: string;
  /** The threshold it crossed, with its unit. */
  threshold: string;
}

function describeWarnings(result: PlainSheetResult, units: DisplayUnits): Map<string, ComparedWarning> {
  const out = new Map<string, ComparedWarning>();
  for (const w of result.warnings) {
    const { finger, joint, where, value, threshold } = describeWarning(w, result.fingers, units);
    out.set(`${w.code}|${finger ?? ''}|${joint ?? ''}`, { code: w.code, severity: w.severity, finger, joint, message: w.message, where, value, threshold });
  }
  return out;
}

/** Warnings raised only in `to` (added), only in `from` (removed), and in both (kept, as worded in `to`); numbers in `units`. */
export function compareWarnings(from: PlainSheetResult, to: PlainSheetResult, units: DisplayUnits = DEFAULT_DISPLAY_UNITS) {
  const before = describeWarnings(from, units);
  const after = describeWarnings(to, units);
  return {
    added: [...after].filter(([key]) => !before.has(key)).map(([, w]) => w),
    removed: [...before].filter(([key]) => !after.has(key)).map(([, w]) => w),
    kept: [...after].filter(([key]) => before.has(key)).map(([, w]) => w),
  };
}

export interface ComparedSide {
  sheetId: string;
  sheetTitle: string;
  revision: number;
  message: string;
  authorName: string | null;
  createdAt: Date;
  /** Issues when the stored inputs no longer read as a sheet (then no outputs are compared). */
  issues: SheetIssue[];
}

export interface Comparison {
  from: ComparedSide;
  to: ComparedSide;
  inputChanges: InputChange[];
  fields: InputField[];
  outputs: OutputDifference[] | null;
  warnings: ReturnType<typeof compareWarnings> | null;
  /** The display units of B, in which the page shows both sides (the numbers here stay SI). */
  display: DisplayUnits;
  thresholds: { equalAbsolute: number; equalRelative: number; majorRelative: number };
}

function solveStored(inputs: unknown): { result: PlainSheetResult | null; issues: SheetIssue[] } {
  const evaluated = evaluateSheet(inputs);
  return evaluated.ok ? { result: evaluated.value.result, issues: [] } : { result: null, issues: evaluated.error.issues };
}

/**
 * Compares revision `fromRevision` of `fromSheet` with revision `toRevision` of `toSheet` (the
 * same sheet or another one the caller may read); null when either revision does not exist.
 */
export async function compareRevisions(
  database: Database,
  fromSheet: Pick<Sheet, 'id' | 'title'>,
  fromRevision: number,
  toSheet: Pick<Sheet, 'id' | 'title'>,
  toRevision: number,
): Promise<Comparison | null> {
  const [a, b] = await Promise.all([getRevision(database, fromSheet.id, fromRevision), getRevision(database, toSheet.id, toRevision)]);
  if (!a || !b) return null;
  const solvedA = solveStored(a.inputs);
  const solvedB = solveStored(b.inputs);
  const side = (sheet: Pick<Sheet, 'id' | 'title'>, revision: NonNullable<typeof a>, issues: SheetIssue[]): ComparedSide => ({
    sheetId: sheet.id,
    sheetTitle: sheet.title,
    revision: revision.number,
    message: revision.message,
    authorName: revision.authorName,
    createdAt: revision.createdAt,
    issues,
  });
  const both = solvedA.result && solvedB.result ? { from: solvedA.result, to: solvedB.result } : null;
  return {
    from: side(fromSheet, a, solvedA.issues),
    to: side(toSheet, b, solvedB.issues),
    inputChanges: diffInputs(a.inputs, b.inputs),
    fields: sideBySide(a.inputs, b.inputs),
    outputs: both ? compareOutputs(both.from, both.to) : null,
    warnings: both ? compareWarnings(both.from, both.to, displayUnitsOf(b.inputs)) : null,
    display: displayUnitsOf(b.inputs),
    thresholds: { equalAbsolute: EQUAL_ABSOLUTE, equalRelative: EQUAL_RELATIVE, majorRelative: MAJOR_RELATIVE },
  };
}

/** JSON.stringify replacer: JSON has no Infinity or NaN, so they travel as the strings "Infinity", "-Infinity", "NaN". */
export function nonFiniteAsText(_key: string, value: unknown): unknown {
  return typeof value === 'number' && !Number.isFinite(value) ? String(value) : value;
}
