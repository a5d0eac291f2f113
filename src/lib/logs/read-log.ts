/**
 * Streams a controller log (CSV with a header line) through papaparse and hands each row to the
 * caller as a sample in SI units, one row at a time, so memory stays bounded whatever the length.
 * Bad cells, missing columns, rows out of time order and repeated timestamps are located errors;
 * gaps are reported. Nothing is fixed up silently: a row with an error is not passed on.
 * Lines are counted as CSV records (the header is line 1), which equals text lines unless a
 * quoted field holds a line break.
 */
import Papa from 'papaparse';
import { quat } from '../kinematics';
import { MAX_ANGLE, MAX_ANGULAR_SPEED, MAX_LENGTH, MAX_SPEED } from '../sheet/schema';
import { ANGLE_UNITS, LENGTH_UNITS, RATE_UNITS, SPEED_UNITS, TIME_UNITS, type LogMapping } from './mapping';

/** A log as papaparse reads it: CSV text, a browser File, or a Node readable stream (already decompressed). */
export type LogSource = string | Papa.LocalFile;

/** Largest magnitude of a logged time, s: past the Unix epoch time of today, so absolute timestamps pass. */
export const MAX_LOG_TIME = 1e10;
/** A logged quaternion may be off unit length by this much (float32 logs round); it is then normalised. */
export const QUATERNION_LENGTH_TOLERANCE = 1e-2;
/** An interval longer than this many nominal sample periods is a gap. */
export const GAP_FACTOR = 1.5;
/** Shortest interval between samples, s: no controller logs faster than 1 MHz, and pose derivatives over shorter intervals lose their digits. */
export const MIN_LOG_INTERVAL = 1e-6;
/** Errors collected before reading stops. */
export const MAX_LOG_ISSUES = 50;

/** One located problem of a log: line (header = 1), column (1-based) and its header name when known. */
export interface LogIssue {
  line: number;
  column?: number;
  columnName?: string;
  expected: string;
  found: string;
  message: string;
}

/** An interval between two consecutive samples longer than GAP_FACTOR nominal periods. */
export interface LogGap {
  /** Line of the sample after the gap. */
  line: number;
  /** Times of the samples before and after the gap, s. */
  from: number;
  to: number;
}

/** One row in SI units (s, m, rad, rad/s, m/s), world (palm) frame. Per mapped joint entries follow mapping.joints; NaN where not mapped. */
export interface LogSample {
  line: number;
  time: number;
  position: Float64Array;
  /** Unit quaternion [x, y, z, w]. */
  orientation: Float64Array;
  angles: Float64Array;
  commandedRates: Float64Array;
  measuredRates: Float64Array;
  /** Wanted twist [v; w] (m/s, rad/s) when mapped, else absent. */
  wantedTwist?: Float64Array;
  /** The interval before this sample is a gap (or this is the first sample). */
  afterGap: boolean;
}

interface Cell {
  index: number;
  factor: number;
  limit: number;
  what: string;
}

/** The cells of a row that the mapping reads, resolved against the header once. */
interface Cells {
  time: Cell;
  position: Cell[];
  /** Quaternion parts x, y, z, w, or roll, pitch, yaw. */
  quaternion?: Cell[];
  rollPitchYaw?: Cell[];
  angles: (Cell | undefined)[];
  commanded: (Cell | undefined)[];
  measured: (Cell | undefined)[];
  twist?: Cell[];
}

/**
 * The decimal number a cell holds, or NaN. Number() alone would also read "" and blanks as 0 and
 * "0x10", "0b1" and "0o7" as integers; only decimal notation counts as a logged value.
 */
function decimal(text: string): number {
  const value = Number(text);
  if (!Number.isFinite(value)) return NaN;
  if (value === 0 && text.trim() === '') return NaN;
  const second = text.charCodeAt(1) | 0x20;
  if (text.length > 2 && text.charCodeAt(0) === 48 && (second === 120 || second === 98 || second === 111)) return NaN;
  return value;
}

/** Samples handed out live in a ring of this many; a sample stays valid until this many more have been read. */
export const SAMPLE_RING = 3;

function createSample(jointCount: number, twist: boolean): LogSample {
  return {
    line: 0,
    time: 0,
    position: new Float64Array(3),
    orientation: new Float64Array(4),
    angles: new Float64Array(jointCount).fill(NaN),
    commandedRates: new Float64Array(jointCount).fill(NaN),
    measuredRates: new Float64Array(jointCount).fill(NaN),
    ...(twist ? { wantedTwist: new Float64Array(6) } : {}),
    afterGap: false,
  };
}

export interface ReadLogOptions {
  onSample: (sample: LogSample) => void;
  /** Called with each gap found. */
  onGap?: (gap: LogGap) => void;
}

export interface ReadLogOutcome {
  issues: LogIssue[];
  sampleCount: number;
  header: string[];
}

const X_AXIS = [1, 0, 0], Y_AXIS = [0, 1, 0], Z_AXIS = [0, 0, 1];

/** Orientation [x, y, z, w] of roll, pitch, yaw (rad) in the mapping's convention. */
export function quaternionFromRollPitchYaw(roll: number, pitch: number, yaw: number, convention: 'zyx' | 'xyz', out: Float64Array): Float64Array {
  const qx = quat.fromAxisAngle(X_AXIS, roll), qy = quat.fromAxisAngle(Y_AXIS, pitch), qz = quat.fromAxisAngle(Z_AXIS, yaw);
  return convention === 'zyx' ? quat.multiply(quat.multiply(qz, qy), qx, out) : quat.multiply(quat.multiply(qx, qy), qz, out);
}

/** Reads the log row by row, passing each good sample on; resolves when the source ends or too many errors were found. */
export function readLog(source: LogSource, mapping: LogMapping, options: ReadLogOptions): Promise<ReadLogOutcome> {
  const issues: LogIssue[] = [];
  const jointCount = mapping.joints.length;
  const ring = Array.from({ length: SAMPLE_RING }, () => createSample(jointCount, mapping.wantedTwist !== undefined));
  const timeFactor = TIME_UNITS[mapping.time.unit];
  const period = mapping.time.period === undefined ? undefined : mapping.time.period * timeFactor;
  let header: string[] = [];
  let cells: Cells | undefined;
  let line = 0;
  let sampleCount = 0;
  let previousTime = NaN;
  let nominal = period;
  const values = new Float64Array(4);

  const addIssue = (issue: Omit<LogIssue, 'message'>): void => {
    const where = issue.column === undefined ? `line ${issue.line}` : `line ${issue.line}, column ${issue.column}${issue.columnName === undefined ? '' : ` ("${issue.columnName}")`}`;
    issues.push({ ...issue, message: `${where}: expected ${issue.expected}, found ${issue.found}` });
  };

  const readHeader = (row: string[]): void => {
    header = row.map((name) => name.trim());
    const positions = new Map<string, number>();
    const repeated = new Set<string>();
    header.forEach((name, i) => (positions.has(name) ? repeated.add(name) : positions.set(name, i)));
    const want = (name: string, factor: number, limit: number, what: string, path: string): Cell => {
      const index = positions.get(name);
      if (index === undefined) addIssue({ line: 1, expected: `a column "${name}" (${path} in the mapping)`, found: 'no such column in the header' });
      else if (repeated.has(name)) addIssue({ line: 1, column: index + 1, columnName: name, expected: `one column named "${name}" (${path})`, found: 'it more than once' });
      return { index: index ?? -1, factor, limit, what };
    };
    const length = LENGTH_UNITS[mapping.pose.position.unit];
    const orientation = mapping.pose.orientation;
    const found: Cells = {
      time: want(mapping.time.column, timeFactor, MAX_LOG_TIME, 'a time', 'time.column'),
      position: mapping.pose.position.columns.map((name, k) => want(name, length, MAX_LENGTH, 'a position', `pose.position.columns[${k}]`)),
      ...('quaternion' in orientation
        ? { quaternion: (['x', 'y', 'z', 'w'] as const).map((part) => want(orientation.quaternion[part], 1, 2, 'a quaternion part', `pose.orientation.quaternion.${part}`)) }
        : {
            rollPitchYaw: orientation.rollPitchYaw.columns.map((name, k) =>
              want(name, ANGLE_UNITS[orientation.rollPitchYaw.unit], MAX_ANGLE, 'an angle', `pose.orientation.rollPitchYaw.columns[${k}]`)),
          }),
      angles: mapping.joints.map((entry, j) => entry.angle && want(entry.angle.column, ANGLE_UNITS[entry.angle.unit], MAX_ANGLE, 'a joint angle', `joints[${j}].angle.column`)),
      commanded: mapping.joints.map((entry, j) =>
        entry.commandedRate && want(entry.commandedRate.column, RATE_UNITS[entry.commandedRate.unit], MAX_ANGULAR_SPEED, 'a joint rate', `joints[${j}].commandedRate.column`)),
      measured: mapping.joints.map((entry, j) =>
        entry.measuredRate && want(entry.measuredRate.column, RATE_UNITS[entry.measuredRate.unit], MAX_ANGULAR_SPEED, 'a joint rate', `joints[${j}].measuredRate.column`)),
    };
    if (mapping.wantedTwist) {
      const { linear, angular } = mapping.wantedTwist;
      found.twist = [
        ...linear.columns.map((name, k) => want(name, SPEED_UNITS[linear.unit], MAX_SPEED, 'a speed', `wantedTwist.linear.columns[${k}]`)),
        ...angular.columns.map((name, k) => want(name, RATE_UNITS[angular.unit], MAX_ANGULAR_SPEED, 'an angular speed', `wantedTwist.angular.columns[${k}]`)),
      ];
    }
    cells = issues.length === 0 ? found : undefined;
  };

  /** Reads one cell into SI, or records why not; returns NaN on failure. */
  const cell = (row: string[], c: Cell): number => {
    const text = row[c.index]!;
    const value = decimal(text) * c.factor;
    if (!Number.isFinite(value)) {
      const trimmed = text.trim();
      addIssue({ line, column: c.index + 1, columnName: header[c.index], expected: `${c.what} (a decimal number)`, found: trimmed === '' ? 'an empty cell' : `"${trimmed.slice(0, 40)}"` });
      return NaN;
    }
    if (Math.abs(value) > c.limit) {
      addIssue({ line, column: c.index + 1, columnName: header[c.index], expected: `${c.what} of at most ${c.limit} in SI units`, found: text.trim() });
      return NaN;
    }
    return value;
  };

  const readRow = (row: string[]): void => {
    if (row.length !== header.length) {
      addIssue({ line, expected: `${header.length} fields as in the header`, found: `${row.length}` });
      return;
    }
    const c = cells!;
    const before = issues.length;
    const sample = ring[sampleCount % SAMPLE_RING]!;
    sample.line = line;
    sample.time = cell(row, c.time);
    for (let k = 0; k < 3; k++) sample.position[k] = cell(row, c.position[k]!);
    if (c.quaternion) {
      for (let k = 0; k < 4; k++) values[k] = cell(row, c.quaternion[k]!);
      const norm = Math.hypot(values[0]!, values[1]!, values[2]!, values[3]!);
      const w = c.quaternion[3]!;
      if (issues.length === before && Math.abs(norm - 1) > QUATERNION_LENGTH_TOLERANCE) {
        addIssue({ line, column: w.index + 1, columnName: header[w.index], expected: `a unit quaternion (length within ${QUATERNION_LENGTH_TOLERANCE} of 1)`, found: `length ${norm.toPrecision(6)}` });
      } else if (issues.length === before) {
        quat.normalize(values.subarray(0, 4), sample.orientation);
      }
    } else if (c.rollPitchYaw) {
      for (let k = 0; k < 3; k++) values[k] = cell(row, c.rollPitchYaw[k]!);
      const rpy = mapping.pose.orientation as Extract<LogMapping['pose']['orientation'], { rollPitchYaw: unknown }>;
      if (issues.length === before) quaternionFromRollPitchYaw(values[0]!, values[1]!, values[2]!, rpy.rollPitchYaw.convention, sample.orientation);
    }
    for (let j = 0; j < jointCount; j++) {
      const angle = c.angles[j], commanded = c.commanded[j], measured = c.measured[j];
      if (angle) sample.angles[j] = cell(row, angle);
      if (commanded) sample.commandedRates[j] = cell(row, commanded);
      if (measured) sample.measuredRates[j] = cell(row, measured);
    }
    if (sample.wantedTwist && c.twist) {
      for (let k = 0; k < 6; k++) sample.wantedTwist[k] = cell(row, c.twist[k]!);
    }
    if (issues.length !== before) return;
    const time = sample.time;
    const timeCell = c.time;
    if (sampleCount > 0) {
      const interval = time - previousTime;
      if (interval < 0) {
        addIssue({ line, column: timeCell.index + 1, columnName: header[timeCell.index], expected: `a time after ${previousTime} s (the line before)`, found: `${time} s, out of time order` });
        return;
      }
      if (interval === 0) {
        addIssue({ line, column: timeCell.index + 1, columnName: header[timeCell.index], expected: `a time after ${previousTime} s (the line before)`, found: 'the same time again (a repeated timestamp)' });
        return;
      }
      if (interval < MIN_LOG_INTERVAL) {
        addIssue({ line, column: timeCell.index + 1, columnName: header[timeCell.index], expected: `a time at least ${MIN_LOG_INTERVAL} s after ${previousTime} s (the line before)`, found: `${time} s` });
        return;
      }
      nominal ??= interval;
      sample.afterGap = interval > GAP_FACTOR * nominal;
      if (sample.afterGap) options.onGap?.({ line, from: previousTime, to: time });
    } else {
      sample.afterGap = true;
    }
    previousTime = time;
    sampleCount++;
    options.onSample(sample);
  };

  return new Promise((resolve, reject) => {
    Papa.parse<string[]>(source as Papa.LocalFile, {
      header: false,
      dynamicTyping: false,
      skipEmptyLines: false,
      // Whole chunks of rows rather than one callback per row: papaparse then builds one result object per chunk.
      chunk: (results, parser) => {
        try {
          for (const row of results.data) {
            line++;
            if (row.length === 1 && row[0]!.trim() === '') continue;
            if (line === 1) readHeader(row);
            else if (cells) readRow(row);
            if (issues.length >= MAX_LOG_ISSUES || (line === 1 && cells === undefined)) {
              parser.abort();
              return;
            }
          }
        } catch (error) {
          parser.abort();
          reject(error);
        }
      },
      complete: () => {
        if (line === 0) addIssue({ line: 1, expected: 'a header line naming the columns', found: 'an empty log' });
        else if (sampleCount === 0 && issues.length === 0) addIssue({ line: line + 1, expected: 'at least one sample after the header', found: 'the end of the log' });
        resolve({ issues: issues.slice(0, MAX_LOG_ISSUES), sampleCount, header });
      },
      error: (error: Error) => reject(error),
    });
  });
}
