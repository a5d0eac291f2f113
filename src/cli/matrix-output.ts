/**
 * The compute command's test matrix: runs the sheet's matrix, optionally writing every tick of every
 * run to a state-action data set (JSON Lines: a metadata line, then one object per tick; CSV: the
 * safety comment line, then a header and one row per tick), and answers the printed result.
 */
import { closeSync, openSync, writeSync } from 'node:fs';
import { datasetColumns, datasetMetadata, datasetRows } from '../lib/sheet/dataset';
import { runMatrix, type MatrixResult } from '../lib/sheet/matrix';
import { matrixCsv } from '../lib/sheet/matrix-csv';
import { csvTable } from '../lib/sheet/results-csv';
import { SAFETY_CSV_COMMENT } from '../lib/safety';
import type { SheetDocument } from '../lib/sheet/types';
import { InputError } from './input-files';

export const DATASET_EXTENSIONS = ['.jsonl', '.csv'] as const;

/** JSON has no Infinity or NaN; they are written as strings so nothing is silently lost. */
export const finiteReplacer = (_: string, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : v);

/** Runs the matrix, writing the data set to `dataset` as the runs finish; rows are written per run, so memory holds one run. */
export function computeMatrix(doc: SheetDocument, dataset?: string): MatrixResult {
  if (dataset === undefined) return runMatrix(doc);
  let fd: number;
  try {
    fd = openSync(dataset, 'w');
  } catch (error) {
    throw new InputError(`${dataset}: cannot write the data set (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
  try {
    const columns = datasetColumns(doc);
    const names = columns.map((c) => c.name);
    const jsonLines = dataset.endsWith('.jsonl');
    writeSync(fd, jsonLines ? `${JSON.stringify({ metadata: datasetMetadata(doc, columns) }, finiteReplacer)}\n` : `${SAFETY_CSV_COMMENT}\n${csvTable(names, [])}\n`);
    return runMatrix(doc, doc.matrix, {
      onRun: (run, record) => {
        const rows = datasetRows(doc, run, record);
        const text = jsonLines
          ? rows.map((row) => JSON.stringify(Object.fromEntries(names.map((name, i) => [name, row[i]])), finiteReplacer)).join('\n')
          : csvTable(names, rows).slice(csvTable(names, []).length + 1);
        if (text.length > 0) writeSync(fd, `${text}\n`);
      },
    });
  } finally {
    closeSync(fd);
  }
}

/** The result as printed: JSON (pretty, with the sheet title) or the CSV tables. */
export function matrixOutput(title: string, result: MatrixResult, format: 'json' | 'csv', safety: string): string {
  if (format === 'csv') return matrixCsv(result);
  return `${JSON.stringify({ title, safety, matrix: result }, finiteReplacer, 2)}\n`;
}
