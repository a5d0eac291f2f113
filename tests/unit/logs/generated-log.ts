/** Logs written from a sheet's own run (the core's runSheet), with faults added to chosen rows, for the comparison tests. */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { runSheet, type RunRecord } from '../../../src/lib/kinematics/index';
import { runLogHeader, runLogMapping, runLogRow } from '../../../src/lib/logs/generate';
import { parseLogMapping, type LogMapping } from '../../../src/lib/logs/mapping';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { SheetDocument } from '../../../src/lib/sheet/types';

export const TOLERANCES = { rate: '0.05 rad/s', slip: '1 mm/s' };

/** The three-finger template on a 30 mm sphere, run for `ticks` ticks without stopping at the target. */
export function generatedRun(ticks = 600): { doc: SheetDocument; record: RunRecord; mapping: LogMapping; header: string[] } {
  const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  const record = runSheet(doc, { settings: { ...doc.motion.run, maxTicks: ticks, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
  const read = parseLogMapping(runLogMapping(doc, TOLERANCES));
  if (!read.ok) throw new Error(JSON.stringify(read.issues));
  return { doc, record, mapping: read.mapping, header: runLogHeader(doc) };
}

/** The log as CSV text; `change` may alter each row (numbers in header order) before it is written. */
export function logText(run: ReturnType<typeof generatedRun>, change?: (row: number[], tick: number) => void): string {
  const lines = [run.header.join(',')];
  for (let tick = 0; tick < run.record.tickCount; tick++) {
    const row = runLogRow(run.record, tick);
    change?.(row, tick);
    lines.push(row.join(','));
  }
  return `${lines.join('\n')}\n`;
}

/** Where writeLogFiles put the files the command-line tests read. */
export interface LogFiles {
  sheetFile: string;
  mappingFile: string;
  /** The run's own log: within tolerance. */
  cleanLog: string;
  /** gzip; a commanded-rate fault of 0.3 rad/s on "north-base" for ticks 100 to 149, six times the 0.05 rad/s tolerance. */
  faultyLog: string;
  /** A time cell reading "zero" on line 4. */
  badLog: string;
}

/** Writes the run's sheet, its mapping and three logs of it into `folder`, for tests of the commands that compare logs. */
export function writeLogFiles(folder: string, run: ReturnType<typeof generatedRun>): LogFiles {
  const files: LogFiles = {
    sheetFile: join(folder, 'tri-radial.json'),
    mappingFile: join(folder, 'mapping.json'),
    cleanLog: join(folder, 'clean.csv'),
    faultyLog: join(folder, 'faulty.csv.gz'),
    badLog: join(folder, 'bad.csv'),
  };
  const commanded = run.header.indexOf('north-base.commanded');
  writeFileSync(files.sheetFile, JSON.stringify(run.doc));
  writeFileSync(files.mappingFile, JSON.stringify(runLogMapping(run.doc, TOLERANCES)));
  writeFileSync(files.cleanLog, logText(run));
  writeFileSync(files.faultyLog, new Uint8Array(gzipSync(logText(run, (row, tick) => { if (tick >= 100 && tick < 150) row[commanded]! += 0.3; }))));
  writeFileSync(files.badLog, logText(run).replace(/\n0\.01,/, '\nzero,'));
  return files;
}
