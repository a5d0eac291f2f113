/**
 * The state-action data set of a test matrix, for teams that train a learned controller on this
 * analytic expert: one row per tick of every run, holding the state (the true object pose and the
 * joint angles at the start of the tick), the target, and the action (the joint rates the commanded
 * solution gave that tick, and which solution each finger followed). Every column's unit is in its
 * name; the metadata carries the safety caution, the sheet, the commanded solution and the columns.
 */
import { SOLUTION_KINDS, warningsAt, type RunRecord } from '../kinematics';
import { SAFETY_CAUTION_TEXT } from '../safety';
import type { MatrixRun } from './matrix';
import { commandedSolutionOf } from './schema';
import type { SheetDocument } from './types';

export interface DatasetColumn {
  name: string;
  unit: string;
  meaning: string;
}

/** The columns of the data set for this sheet's hand, in row order. */
export function datasetColumns(doc: SheetDocument): DatasetColumn[] {
  const perJoint = (suffix: string, unit: string, meaning: string) =>
    doc.hand.fingers.flatMap((finger) => finger.joints.map((joint) => ({ name: `${finger.name}.${joint.name}.${suffix}`, unit, meaning: `${meaning} of joint ${joint.name} of finger ${finger.name}` })));
  return [
    { name: 'run', unit: '1', meaning: 'index of the matrix run (target-major, start-minor)' },
    { name: 'target', unit: '1', meaning: 'index of the target (listed targets, then generated ones)' },
    { name: 'start', unit: '1', meaning: 'index of the start pose' },
    { name: 'group', unit: 'text', meaning: 'group label of the target' },
    { name: 'tick', unit: '1', meaning: 'tick within the run, from 0' },
    { name: 'time_s', unit: 's', meaning: 'time at the start of the tick' },
    ...['x', 'y', 'z'].map((axis) => ({ name: `object_${axis}_m`, unit: 'm', meaning: `object origin ${axis}, palm frame (true pose)` })),
    ...['w', 'x', 'y', 'z'].map((part) => ({ name: `object_q${part}`, unit: '1', meaning: `object orientation quaternion ${part} (scalar first), palm frame (true pose)` })),
    ...perJoint('angle_rad', 'rad', 'angle at the start of the tick'),
    ...['x', 'y', 'z'].map((axis) => ({ name: `target_${axis}_m`, unit: 'm', meaning: `target position ${axis}, palm frame` })),
    ...['w', 'x', 'y', 'z'].map((part) => ({ name: `target_q${part}`, unit: '1', meaning: `target orientation quaternion ${part} (scalar first), palm frame` })),
    ...perJoint('rate_rad_s', 'rad/s', 'commanded rate'),
    ...doc.hand.fingers.map((finger) => ({ name: `${finger.name}.solution`, unit: 'text', meaning: `solution finger ${finger.name} followed: ${SOLUTION_KINDS.join(' or ')}` })),
    { name: 'warnings', unit: 'text', meaning: 'warning codes raised this tick, space-separated' },
  ];
}

/** What a data set file says about itself: the caution, the sheet, the commanded solution, conventions and columns. */
export function datasetMetadata(doc: SheetDocument, columns: readonly DatasetColumn[]) {
  return {
    format: 'slipless.dataset',
    version: 1,
    safety: SAFETY_CAUTION_TEXT,
    sheet: doc.title,
    commanded: commandedSolutionOf(doc),
    runSettings: doc.motion.run,
    conventions: { units: 'SI: m, rad, s', frame: 'palm (world) frame', quaternion: 'w, x, y, z (scalar first)' },
    columns,
  };
}

/** The rows of one finished run, values in datasetColumns order. */
export function datasetRows(doc: SheetDocument, run: MatrixRun, record: RunRecord): unknown[][] {
  const target = doc.motion.target.position;
  const q = run.targetOrientation;
  const fingers = record.jointCounts.length;
  const rows: unknown[][] = [];
  for (let k = 0; k < record.tickCount; k++) {
    const row: unknown[] = [run.index, run.target, run.start, run.group, k, record.time[k]];
    row.push(record.position[3 * k], record.position[3 * k + 1], record.position[3 * k + 2]);
    row.push(record.orientation[4 * k + 3], record.orientation[4 * k], record.orientation[4 * k + 1], record.orientation[4 * k + 2]);
    record.jointAngles.forEach((column, i) => {
      const n = record.jointCounts[i]!;
      for (let j = 0; j < n; j++) row.push(column[n * k + j]);
    });
    row.push(target[0], target[1], target[2], q.w, q.x, q.y, q.z);
    record.jointRates.forEach((column, i) => {
      const n = record.jointCounts[i]!;
      for (let j = 0; j < n; j++) row.push(column[n * k + j]);
    });
    for (let i = 0; i < fingers; i++) row.push(SOLUTION_KINDS[record.solution[fingers * k + i]!]);
    row.push(warningsAt(record, k).join(' '));
    rows.push(row);
  }
  return rows;
}
