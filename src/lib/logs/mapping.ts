/**
 * The log mapping (format "slipless.log-mapping", version 1): which columns of a controller log
 * hold the time, the object pose, each sheet joint's angle and rates and an optional wanted
 * twist, in which units, and the tolerances a comparison judges by. Read from untrusted JSON
 * with zod; every unit is one of a short list, so each column converts to SI by one factor.
 */
import { z } from 'zod';
import { MAX_ANGULAR_SPEED, MAX_SPEED, MAX_TIME } from '../sheet/schema';
import { parseQuantity } from '../sheet/units';

export const LOG_MAPPING_FORMAT = 'slipless.log-mapping';
export const LOG_MAPPING_VERSION = 1;
/** Longest column name accepted, in characters. */
export const MAX_COLUMN_NAME = 200;
/** Most joint entries in a mapping: every joint of the largest hand (8 fingers of 12 joints). */
export const MAX_MAPPED_JOINTS = 96;
/** Longest tolerance text accepted, in characters. */
export const MAX_TOLERANCE_TEXT = 100;

/** SI factor of each accepted unit: seconds, metres, radians, radians per second, metres per second. */
export const TIME_UNITS = { s: 1, ms: 1e-3, us: 1e-6 } as const;
export const LENGTH_UNITS = { m: 1, mm: 1e-3 } as const;
export const ANGLE_UNITS = { rad: 1, deg: Math.PI / 180 } as const;
export const RATE_UNITS = { 'rad/s': 1, 'deg/s': Math.PI / 180, rpm: (2 * Math.PI) / 60 } as const;
export const SPEED_UNITS = { 'm/s': 1, 'mm/s': 1e-3 } as const;

/**
 * Roll-pitch-yaw conventions (r, p, y about x, y, z): "zyx" is R = Rz(yaw) Ry(pitch) Rx(roll), the
 * usual aircraft and ROS order (intrinsic z-y'-x'', the same as extrinsic x-y-z); "xyz" is
 * R = Rx(roll) Ry(pitch) Rz(yaw) (intrinsic x-y'-z'').
 */
export const RPY_CONVENTIONS = ['zyx', 'xyz'] as const;
export type RpyConvention = (typeof RPY_CONVENTIONS)[number];

export const logMappingMetadata = z.registry<{ id?: string; description: string }>();

const columnName = z
  .string({ error: 'expected a column name (text)' })
  .min(1, { error: 'a column name must not be empty' })
  .max(MAX_COLUMN_NAME, { error: `a column name must be at most ${MAX_COLUMN_NAME} characters` })
  .register(logMappingMetadata, { id: 'ColumnName', description: 'Name of a column in the log header, exactly as written there.' });

function unitOf<T extends Record<string, number>>(units: T, what: string) {
  const names = Object.keys(units) as [keyof T & string, ...(keyof T & string)[]];
  return z.enum(names, { error: `expected ${what}: one of ${names.join(', ')}` });
}

const column = <T extends Record<string, number>>(units: T, what: string, id: string, description: string) =>
  z.strictObject({ column: columnName, unit: unitOf(units, what) }).register(logMappingMetadata, { id, description });

const angleColumn = column(ANGLE_UNITS, 'an angle unit', 'AngleColumn', 'A logged joint angle and its unit.');
const rateColumn = column(RATE_UNITS, 'a joint rate unit', 'RateColumn', 'A logged joint rate and its unit.');

const threeColumns = z.tuple([columnName, columnName, columnName], { error: 'expected three column names [x, y, z]' });

const tolerance = (kind: 'angularSpeed' | 'speed', max: number, example: string) =>
  z
    .string({ error: `expected a tolerance with a unit such as "${example}"` })
    .trim()
    .min(1, { error: `expected a tolerance with a unit such as "${example}"` })
    .max(MAX_TOLERANCE_TEXT, { error: `a tolerance must be at most ${MAX_TOLERANCE_TEXT} characters` })
    .transform((text, ctx) => {
      const read = parseQuantity(text, kind);
      if (!read.ok) {
        ctx.addIssue({ code: 'custom', message: read.message, input: text });
        return z.NEVER;
      }
      return read.value;
    })
    .pipe(z.number().gt(0, { error: 'must be greater than 0' }).lte(max, { error: `must be at most ${max} (SI units)` }));

export const logMappingSchema = z
  .strictObject({
    format: z.literal(LOG_MAPPING_FORMAT, { error: `expected "${LOG_MAPPING_FORMAT}"` }),
    version: z.literal(LOG_MAPPING_VERSION, { error: `expected version ${LOG_MAPPING_VERSION}` }),
    time: z
      .strictObject({
        column: columnName,
        unit: unitOf(TIME_UNITS, 'a time unit'),
        period: z
          .number({ error: 'expected the nominal sample period as a number in the time unit' })
          .gt(0, { error: 'must be greater than 0' })
          .lte(MAX_TIME, { error: `must be at most ${MAX_TIME}` })
          .optional(),
      })
      .register(logMappingMetadata, {
        id: 'TimeColumn',
        description: 'The time column and its unit; period is the nominal sample interval in that unit (default: the first interval of the log).',
      }),
    pose: z.strictObject({
      position: z.strictObject({ columns: threeColumns, unit: unitOf(LENGTH_UNITS, 'a length unit') }),
      orientation: z.union([
        z.strictObject({ quaternion: z.strictObject({ w: columnName, x: columnName, y: columnName, z: columnName }) }),
        z.strictObject({
          rollPitchYaw: z.strictObject({
            columns: threeColumns,
            unit: unitOf(ANGLE_UNITS, 'an angle unit'),
            convention: z.enum(RPY_CONVENTIONS, { error: `expected a convention: one of ${RPY_CONVENTIONS.join(', ')}` }),
          }),
        }),
      ], { error: 'expected {"quaternion": {w, x, y, z}} or {"rollPitchYaw": {columns, unit, convention}}' }),
    }),
    joints: z
      .array(
        z.strictObject({
          joint: z.string({ error: 'expected the name of a joint of the sheet' }).min(1).max(MAX_COLUMN_NAME),
          angle: angleColumn.optional(),
          commandedRate: rateColumn.optional(),
          measuredRate: rateColumn.optional(),
        }),
        { error: 'expected a list of joints' },
      )
      .max(MAX_MAPPED_JOINTS, { error: `at most ${MAX_MAPPED_JOINTS} joints` }),
    wantedTwist: z
      .strictObject({
        linear: z.strictObject({ columns: threeColumns, unit: unitOf(SPEED_UNITS, 'a speed unit') }),
        angular: z.strictObject({ columns: threeColumns, unit: unitOf(RATE_UNITS, 'an angular speed unit') }),
      })
      .optional(),
    tolerances: z.strictObject({
      rate: tolerance('angularSpeed', MAX_ANGULAR_SPEED, '0.05 rad/s'),
      slip: tolerance('speed', MAX_SPEED, '1 mm/s'),
    }),
  })
  .superRefine((mapping, ctx) => {
    const seen = new Set<string>();
    mapping.joints.forEach((entry, i) => {
      if (seen.has(entry.joint)) ctx.addIssue({ code: 'custom', path: ['joints', i, 'joint'], message: `joint "${entry.joint}" is mapped twice` });
      seen.add(entry.joint);
    });
  });

/** A mapping as read: units still named, tolerances in SI (rad/s, m/s). */
export type LogMapping = z.output<typeof logMappingSchema>;

/** One located problem of a mapping file: the field's path (e.g. "joints[2].commandedRate.unit") and what is wrong. */
export interface MappingIssue {
  path: string;
  message: string;
}

/** Path of a field as text: keys joined by dots, indices in brackets. */
export function formatMappingPath(path: readonly PropertyKey[]): string {
  let text = '';
  for (const key of path) text += typeof key === 'number' ? `[${key}]` : text === '' ? String(key) : `.${String(key)}`;
  return text === '' ? '(mapping)' : text;
}

/** Reads an untrusted mapping (JSON value), or lists its located issues. */
export function parseLogMapping(input: unknown): { ok: true; mapping: LogMapping } | { ok: false; issues: MappingIssue[] } {
  const read = logMappingSchema.safeParse(input, {
    error: (issue) => (issue.code === 'invalid_type' && issue.input === undefined ? 'required' : undefined),
  });
  if (read.success) return { ok: true, mapping: read.data };
  return {
    ok: false,
    issues: read.error.issues.slice(0, 50).map((issue) =>
      issue.code === 'unrecognized_keys'
        ? { path: formatMappingPath([...issue.path, issue.keys[0] ?? '']), message: `unknown field "${issue.keys.join('", "')}"` }
        : { path: formatMappingPath(issue.path), message: issue.message },
    ),
  };
}
