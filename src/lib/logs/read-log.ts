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
  /** Place of the cell's value in an extracted record (after the line), set once the header is read. */
  slot: number;
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

/** The mapped columns of a log in reading order: header index, SI factor and limit of each. */
export interface LogColumns {
  indices: number[];
  factors: number[];
  limits: number[];
  /** Fields of the header: a record with another count is an error. */
  headerLength: number;
}

/** Records extracted from parsed rows: per record its line and its mapped cells in SI units, `stride` numbers apart. */
export interface ExtractedRecords {
  count: number;
  /** Records (by index among this batch) that need their text read again because a field count, cell or limit is off. */
  flagged: number[];
  /** Lines counted so far, blank records included. */
  line: number;
}

/**
 * Numbers of the mapped cells of parsed CSV rows, into `out` (per record: line, then one SI value per mapped column):
 * the one conversion of text to numbers, run where the rows are parsed. Blank records are counted as lines and
 * skipped. A record whose field count is off, or with a cell that is not a decimal number or beyond its limit, is
 * flagged so that its text is read again for the located error. Self-contained (it refers to nothing outside its
 * body) so that a parsing thread can run the same source text.
 */
export function extractRecords(
  rows: string[][],
  line: number,
  columns: { indices: ArrayLike<number>; factors: ArrayLike<number>; limits: ArrayLike<number>; headerLength: number },
  out: Float64Array,
  flagged: number[],
): ExtractedRecords {
  const indices = columns.indices, factors = columns.factors, limits = columns.limits, width = indices.length, stride = width + 1;
  let count = 0;
  for (let r = 0; r < rows.length; r++) {
    const row = rows[r];
    line++;
    if (row.length === 1 && row[0].trim() === '') continue;
    const base = count * stride;
    out[base] = line;
    let good = row.length === columns.headerLength;
    for (let k = 0; k < width && good; k++) {
      const text = row[indices[k]];
      // decimal(): finite, not blank, not 0x / 0b / 0o notation.
      let value = Number(text);
      if (!(value - value === 0) || (value === 0 && text.trim() === '')) good = false;
      else if (text.length > 2 && text.charCodeAt(0) === 48) {
        const second = text.charCodeAt(1) | 0x20;
        if (second === 120 || second === 98 || second === 111) good = false;
      }
      value *= factors[k];
      if (!(value - value === 0) || Math.abs(value) > limits[k]) good = false;
      out[base + 1 + k] = value;
    }
    if (!good) flagged.push(count);
    count++;
  }
  return { count, flagged, line };
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

/**
 * The checks and conversions of a log after its numbers are extracted, record by record in order: the header,
 * then each record (its SI values, or its text when extraction flagged it), then the end. Both the in-thread
 * reader below and a reader that parses on another thread drive this one, so they find the same samples and issues.
 */
export interface RecordReader {
  /** Reads line 1; the mapped columns, or null (and stopped) for a bad or blank header. */
  header(row: string[]): LogColumns | null;
  /** Reads one extracted record (values at `base`: line, then the columns' SI values) or its text when flagged. */
  record(values: Float64Array, base: number, raw: string[] | null): void;
  /** Reading should stop: the header was bad or too many issues were found. */
  readonly stopped: boolean;
  /** The outcome once the log has ended or reading stopped. */
  finish(): ReadLogOutcome;
}

/** A record reader for the mapping, passing good samples and gaps to `options`. */
export function createRecordReader(mapping: LogMapping, options: ReadLogOptions): RecordReader {
  const issues: LogIssue[] = [];
  const jointCount = mapping.joints.length;
  const ring = Array.from({ length: SAMPLE_RING }, () => createSample(jointCount, mapping.wantedTwist !== undefined));
  const timeFactor = TIME_UNITS[mapping.time.unit];
  const period = mapping.time.period === undefined ? undefined : mapping.time.period * timeFactor;
  let header: string[] = [];
  let cells: Cells | undefined;
  let sampleCount = 0;
  let previousTime = NaN;
  let nominal = period;
  let stopped = false;
  let headerSeen = false;
  const values = new Float64Array(4);

  const addIssue = (issue: Omit<LogIssue, 'message'>): void => {
    const where = issue.column === undefined ? `line ${issue.line}` : `line ${issue.line}, column ${issue.column}${issue.columnName === undefined ? '' : ` ("${issue.columnName}")`}`;
    issues.push({ ...issue, message: `${where}: expected ${issue.expected}, found ${issue.found}` });
    if (issues.length >= MAX_LOG_ISSUES) stopped = true;
  };

  const readHeader = (row: string[]): LogColumns | null => {
    header = row.map((name) => name.trim());
    const positions = new Map<string, number>();
    const repeated = new Set<string>();
    header.forEach((name, i) => (positions.has(name) ? repeated.add(name) : positions.set(name, i)));
    const want = (name: string, factor: number, limit: number, what: string, path: string): Cell => {
      const index = positions.get(name);
      if (index === undefined) addIssue({ line: 1, expected: `a column "${name}" (${path} in the mapping)`, found: 'no such column in the header' });
      else if (repeated.has(name)) addIssue({ line: 1, column: index + 1, columnName: name, expected: `one column named "${name}" (${path})`, found: 'it more than once' });
      return { index: index ?? -1, factor, limit, what, slot: 0 };
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
    if (issues.length > 0) {
      stopped = true;
      return null;
    }
    cells = found;
    const list = [
      found.time, ...found.position, ...(found.quaternion ?? found.rollPitchYaw ?? []),
      ...found.angles, ...found.commanded, ...found.measured, ...(found.twist ?? []),
    ].filter((c): c is Cell => c !== undefined);
    list.forEach((c, k) => (c.slot = k + 1));
    return { indices: list.map((c) => c.index), factors: list.map((c) => c.factor), limits: list.map((c) => c.limit), headerLength: header.length };
  };

  /** Reads one cell of a flagged record's text into SI, or records why not; returns NaN on failure. */
  const cell = (line: number, row: string[], c: Cell): number => {
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

  /** A cell's SI value: extracted, or read again from the text of a flagged record. Made once, not per record: it runs for every cell. */
  const valueOf = (extracted: Float64Array, base: number, raw: string[] | null, line: number, at: Cell): number =>
    raw === null ? extracted[base + at.slot]! : cell(line, raw, at);

  const record = (extracted: Float64Array, base: number, raw: string[] | null): void => {
    const line = extracted[base]!;
    if (raw !== null && raw.length !== header.length) {
      addIssue({ line, expected: `${header.length} fields as in the header`, found: `${raw.length}` });
      return;
    }
    const c = cells!;
    const before = issues.length;
    const sample = ring[sampleCount % SAMPLE_RING]!;
    sample.line = line;
    sample.time = valueOf(extracted, base, raw, line, c.time);
    for (let k = 0; k < 3; k++) sample.position[k] = valueOf(extracted, base, raw, line, c.position[k]!);
    if (c.quaternion) {
      for (let k = 0; k < 4; k++) values[k] = valueOf(extracted, base, raw, line, c.quaternion[k]!);
      const norm = Math.hypot(values[0]!, values[1]!, values[2]!, values[3]!);
      const w = c.quaternion[3]!;
      if (issues.length === before && Math.abs(norm - 1) > QUATERNION_LENGTH_TOLERANCE) {
        addIssue({ line, column: w.index + 1, columnName: header[w.index], expected: `a unit quaternion (length within ${QUATERNION_LENGTH_TOLERANCE} of 1)`, found: `length ${norm.toPrecision(6)}` });
      } else if (issues.length === before) {
        quat.normalize(values.subarray(0, 4), sample.orientation);
      }
    } else if (c.rollPitchYaw) {
      for (let k = 0; k < 3; k++) values[k] = valueOf(extracted, base, raw, line, c.rollPitchYaw[k]!);
      const rpy = mapping.pose.orientation as Extract<LogMapping['pose']['orientation'], { rollPitchYaw: unknown }>;
      if (issues.length === before) quaternionFromRollPitchYaw(values[0]!, values[1]!, values[2]!, rpy.rollPitchYaw.convention, sample.orientation);
    }
    for (let j = 0; j < jointCount; j++) {
      const angle = c.angles[j], commanded = c.commanded[j], measured = c.measured[j];
      if (angle) sample.angles[j] = valueOf(extracted, base, raw, line, angle);
      if (commanded) sample.commandedRates[j] = valueOf(extracted, base, raw, line, commanded);
      if (measured) sample.measuredRates[j] = valueOf(extracted, base, raw, line, measured);
    }
    if (sample.wantedTwist && c.twist) {
      for (let k = 0; k < 6; k++) sample.wantedTwist[k] = valueOf(extracted, base, raw, line, c.twist[k]!);
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

  return {
    header: (row) => {
      headerSeen = true;
      if (row.length === 1 && row[0]!.trim() === '') {
        addIssue({ line: 1, expected: 'a header line naming the columns', found: 'an empty line' });
        stopped = true;
        return null;
      }
      return readHeader(row);
    },
    record,
    get stopped() {
      return stopped;
    },
    finish: () => {
      if (!headerSeen) addIssue({ line: 1, expected: 'a header line naming the columns', found: 'an empty log' });
      // Without samples or issues no record followed the header but blank lines.
      else if (sampleCount === 0 && issues.length === 0) addIssue({ line: 2, expected: 'at least one sample after the header', found: 'the end of the log' });
      return { issues: issues.slice(0, MAX_LOG_ISSUES), sampleCount, header };
    },
  };
}

/** Extracted records of one parsed chunk, reused from chunk to chunk. */
function recordBuffer(columns: LogColumns, rows: number, previous?: Float64Array): Float64Array {
  const size = rows * (columns.indices.length + 1);
  return previous !== undefined && previous.length >= size ? previous : new Float64Array(Math.max(size, 2 * (previous?.length ?? 0)));
}

/**
 * Hands `count` extracted records (`stride` numbers apart) to the reader in order until it stops, with the text of
 * each flagged one: `rawOf(record, k)` for the k-th flagged record.
 */
export function readRecords(
  reader: RecordReader, records: Float64Array, stride: number, count: number, flagged: ArrayLike<number>, rawOf: (record: number, k: number) => string[],
): void {
  let next = 0;
  for (let i = 0; i < count && !reader.stopped; i++) {
    const isFlagged = next < flagged.length && flagged[next] === i;
    reader.record(records, i * stride, isFlagged ? rawOf(i, next) : null);
    if (isFlagged) next++;
  }
}

/** Reads the log row by row, passing each good sample on; resolves when the source ends or too many errors were found. */
export function readLog(source: LogSource, mapping: LogMapping, options: ReadLogOptions): Promise<ReadLogOutcome> {
  const reader = createRecordReader(mapping, options);
  let columns: LogColumns | null = null;
  let line = 0;
  let buffer: Float64Array | undefined;
  const flagged: number[] = [];

  return new Promise((resolve, reject) => {
    Papa.parse<string[]>(source as Papa.LocalFile, {
      header: false,
      dynamicTyping: false,
      skipEmptyLines: false,
      // Whole chunks of rows rather than one callback per row: papaparse then builds one result object per chunk.
      chunk: (results, parser) => {
        try {
          let rows = results.data;
          if (line === 0 && rows.length > 0) {
            line = 1;
            columns = reader.header(rows[0]!);
            rows = rows.slice(1);
            if (reader.stopped) {
              parser.abort();
              return;
            }
          }
          if (columns === null) return;
          buffer = recordBuffer(columns, rows.length, buffer);
          flagged.length = 0;
          const first = line;
          const extracted = extractRecords(rows, first, columns, buffer, flagged);
          line = extracted.line;
          const stride = columns.indices.length + 1, records = buffer;
          // A record's line less the line before the chunk is its place among the chunk's rows (blank rows included).
          readRecords(reader, records, stride, extracted.count, flagged, (record) => rows[records[record * stride]! - first - 1]!);
          if (reader.stopped) parser.abort();
        } catch (error) {
          parser.abort();
          reject(error);
        }
      },
      complete: () => resolve(reader.finish()),
      error: (error: Error) => reject(error),
    });
  });
}
