/**
 * Sheet files in and out: the stored document exported as a versioned JSON file or its results
 * as CSV, and an uploaded file read back with every problem located (line and column for JSON
 * syntax, the field path, and its line, for the document).
 */
import { findNodeAtLocation, parse, parseTree, printParseErrorCode, type Node, type ParseError } from 'jsonc-parser';
import { SAFETY_CSV_COMMENT } from '../safety';
import { evaluateSheet } from '../sheet/evaluate';
import { resultsCsv } from '../sheet/results-csv';
import { SHEET_FORMAT, SHEET_VERSION, type SheetIssue } from '../sheet/schema';
import type { SheetDocument } from '../sheet/types';
import { findOversizedJson, oversizedJsonMessage } from './json-depth';
import type { SheetSummary, StoredDocument } from '../sheet/summary';

/** Largest sheet file accepted for import (bytes of text). */
export const MAX_SHEET_FILE_LENGTH = 2_000_000;

/** A problem in an imported file: what is wrong and where (1-based line and column, and the field for document issues). */
export interface FileIssue {
  message: string;
  path?: string;
  line?: number;
  column?: number;
}

export type ReadSheetFile =
  | { ok: true; document: StoredDocument; doc: SheetDocument; summary: SheetSummary }
  | { ok: false; stage: 'file' | 'syntax' | 'document'; issues: FileIssue[] };

/** 1-based line and column of a character offset (columns count UTF-16 code units, as editors do). */
export function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  const before = text.slice(0, offset);
  const line = before.split('\n').length;
  return { line, column: offset - before.lastIndexOf('\n') };
}

const SYNTAX_MESSAGES: Record<string, string> = {
  InvalidSymbol: 'this is not a JSON value (text needs double quotes; true, false and null are lower case; no NaN or Infinity)',
  InvalidNumberFormat: 'badly written number',
  PropertyNameExpected: 'expected a field name in double quotes (JSON allows no comma before a closing brace)',
  ValueExpected: 'expected a value (JSON allows no comma before a closing bracket, and no empty file)',
  ColonExpected: 'expected a colon after the field name',
  CommaExpected: 'expected a comma between two entries',
  CloseBraceExpected: 'expected } to close the object',
  CloseBracketExpected: 'expected ] to close the list',
  EndOfFileExpected: 'unexpected text after the end of the document',
  InvalidCommentToken: 'JSON allows no comments',
  UnexpectedEndOfComment: 'JSON allows no comments',
  UnexpectedEndOfString: 'text is not closed by a double quote before the end of the line',
  UnexpectedEndOfNumber: 'number ends too early',
  InvalidUnicode: 'bad \\u escape in text',
  InvalidEscapeCharacter: 'unknown escape after a backslash in text',
  InvalidCharacter: 'control character inside text (write it escaped, e.g. \\n)',
};

function syntaxIssue(text: string, error: ParseError): FileIssue {
  const { line, column } = lineAndColumn(text, error.offset);
  const code = printParseErrorCode(error.error);
  const found = error.offset < text.length ? ` (found ${JSON.stringify(text.slice(error.offset, error.offset + Math.max(1, Math.min(error.length, 12))))})` : ' (found the end of the file)';
  return { message: `Invalid JSON at line ${line}, column ${column}: ${SYNTAX_MESSAGES[code] ?? code}${found}.`, line, column };
}

/**
 * The first JSON syntax problem of a text, located at its own line and column (JSON.parse names
 * no position for some, such as a NaN literal, and V8 words its messages for programmers).
 */
export function jsonSyntaxIssue(text: string): FileIssue | undefined {
  const errors: ParseError[] = [];
  parse(text, errors, { disallowComments: true, allowTrailingComma: false, allowEmptyContent: false });
  return errors.length > 0 ? syntaxIssue(text, errors[0]) : undefined;
}

/** Field path segments of a parseSheet issue path such as "hand.fingers[0].joints[1].axis". */
function pathSegments(path: string): (string | number)[] {
  if (path === '(document)') return [];
  const segments: (string | number)[] = [];
  for (const match of path.matchAll(/([^.[\]]+)|\[(\d+)\]/g)) segments.push(match[2] !== undefined ? Number(match[2]) : match[1]);
  return segments;
}

/** Where in the text a field is: the field's name, or the nearest enclosing value that exists. */
function locateField(text: string, root: Node | undefined, path: string): { line: number; column: number } | undefined {
  if (!root) return undefined;
  const segments = pathSegments(path);
  for (let length = segments.length; length >= 0; length--) {
    const node = findNodeAtLocation(root, segments.slice(0, length));
    if (node) return lineAndColumn(text, node.parent?.type === 'property' ? node.parent.offset : node.offset);
  }
  return undefined;
}

/** Reads the text of a sheet file: JSON syntax first, then the document itself, each problem located. */
export function readSheetFile(raw: string): ReadSheetFile {
  if (raw.length > MAX_SHEET_FILE_LENGTH) {
    return { ok: false, stage: 'file', issues: [{ message: `The file is larger than ${MAX_SHEET_FILE_LENGTH / 1_000_000} MB; a sheet document is far smaller.` }] };
  }
  const text = raw.replace(/^\uFEFF/, '');
  const oversized = findOversizedJson(text);
  if (oversized) {
    const { line, column } = lineAndColumn(text, oversized.offset);
    return { ok: false, stage: 'file', issues: [{ message: `${oversizedJsonMessage('The file', oversized.reason)} (line ${line}, column ${column}).`, line, column }] };
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    return { ok: false, stage: 'syntax', issues: [jsonSyntaxIssue(text) ?? { message: `Invalid JSON: ${(error as Error).message}.` }] };
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    return { ok: false, stage: 'document', issues: [{ message: 'A sheet file holds one JSON object with "format": "slipless.sheet".', path: '(document)', line: 1, column: 1 }] };
  }
  const evaluated = evaluateSheet(value);
  if (!evaluated.ok) {
    const root = parseTree(text);
    return {
      ok: false,
      stage: 'document',
      issues: evaluated.error.issues.map((issue: SheetIssue) => ({ message: issue.message, path: issue.path, ...locateField(text, root, issue.path) })),
    };
  }
  return { ok: true, document: value as Record<string, unknown>, doc: evaluated.value.doc, summary: evaluated.value.summary };
}

/** The stored document as a file: the format and version first, then everything as saved. */
export function exportDocument(inputs: StoredDocument): StoredDocument {
  return { format: SHEET_FORMAT, version: SHEET_VERSION, ...inputs };
}

/**
 * The per-finger results of a stored document as CSV, after the safety caution as a comment line (the file carries
 * joint rates toward a controller), or the document's issues when it no longer reads.
 */
export function exportResultsCsv(inputs: unknown): { ok: true; csv: string } | { ok: false; issues: SheetIssue[] } {
  const evaluated = evaluateSheet(inputs);
  if (!evaluated.ok) return { ok: false, issues: evaluated.error.issues };
  return { ok: true, csv: `${SAFETY_CSV_COMMENT}\n${resultsCsv(evaluated.value.doc, evaluated.value.result)}\n` };
}

/** The download's file name; the browser names run and sweep exports the same way. */
export { exportFileName } from '../sheet/run-export';
