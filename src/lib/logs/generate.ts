/**
 * A controller log written from a sheet's own run, as a controller that did exactly what the
 * sheet says would have logged it: time, the object pose it measured and commanded from (the
 * true pose when the run has no sensor noise), and per joint the angle at the start of the tick
 * and the rate it followed, as both the commanded and the measured rate. Used for
 * demo logs, the comparison's tests and the benchmark; faults are added to the rows by the caller.
 */
import type { RunRecord } from '../kinematics';
import type { SheetDocument } from '../sheet/types';
import { LOG_MAPPING_FORMAT, LOG_MAPPING_VERSION } from './mapping';

/** Column names of a generated log, in order. */
export function runLogHeader(doc: SheetDocument): string[] {
  const joints = doc.hand.fingers.flatMap((f) => f.joints.map((j) => j.name));
  return [
    't', 'px', 'py', 'pz', 'qw', 'qx', 'qy', 'qz',
    ...joints.flatMap((name) => [`${name}.angle`, `${name}.commanded`, `${name}.measured`]),
  ];
}

/** Row `tick` of the generated log (s, m, quaternion scalar first, rad, rad/s), in runLogHeader's order; the pose is the measured one. */
export function runLogRow(record: RunRecord, tick: number): number[] {
  const row = [record.time[tick]!];
  for (let k = 0; k < 3; k++) row.push(record.measuredPosition[3 * tick + k]!);
  const q = 4 * tick;
  row.push(record.measuredOrientation[q + 3]!, record.measuredOrientation[q]!, record.measuredOrientation[q + 1]!, record.measuredOrientation[q + 2]!);
  record.jointCounts.forEach((n, f) => {
    for (let k = 0; k < n; k++) {
      const rate = record.jointRates[f]![n * tick + k]!;
      row.push(record.jointAngles[f]![n * tick + k]!, rate, rate);
    }
  });
  return row;
}

/** The mapping of a generated log: every joint's angle, commanded and measured rate, with the given tolerances. */
export function runLogMapping(doc: SheetDocument, tolerances: { rate: string; slip: string }) {
  return {
    format: LOG_MAPPING_FORMAT,
    version: LOG_MAPPING_VERSION,
    time: { column: 't', unit: 's' },
    pose: { position: { columns: ['px', 'py', 'pz'], unit: 'm' }, orientation: { quaternion: { w: 'qw', x: 'qx', y: 'qy', z: 'qz' } } },
    joints: doc.hand.fingers.flatMap((f) =>
      f.joints.map((j) => ({
        joint: j.name,
        angle: { column: `${j.name}.angle`, unit: 'rad' },
        commandedRate: { column: `${j.name}.commanded`, unit: 'rad/s' },
        measuredRate: { column: `${j.name}.measured`, unit: 'rad/s' },
      })),
    ),
    tolerances,
  };
}

/** The whole generated log as CSV text (header line, then one line per tick); numbers written to full precision. */
export function runLogCsv(doc: SheetDocument, record: RunRecord): string {
  const lines = [runLogHeader(doc).join(',')];
  for (let tick = 0; tick < record.tickCount; tick++) lines.push(runLogRow(record, tick).join(','));
  return `${lines.join('\n')}\n`;
}
