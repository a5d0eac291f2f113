/** Logs written from a sheet's own run (the core's runSheet), with faults added to chosen rows, for the comparison tests. */
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
