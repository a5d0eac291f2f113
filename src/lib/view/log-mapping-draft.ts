/**
 * The log comparison panel's mapping form as plain data: the draft it edits (the mapping file's
 * shape, quaternion orientation), a first guess from the log's column names, and the joint names
 * of a stored sheet document. The engine's schema (src/lib/logs/mapping.ts) judges the draft.
 */
import { LOG_MAPPING_FORMAT, LOG_MAPPING_VERSION } from '../logs/mapping';

type AngleUnit = 'rad' | 'deg';
type RateUnit = 'rad/s' | 'deg/s' | 'rpm';

export interface JointDraft {
  joint: string;
  angle?: { column: string; unit: AngleUnit };
  commandedRate?: { column: string; unit: RateUnit };
  measuredRate?: { column: string; unit: RateUnit };
}

export interface MappingDraft {
  format: typeof LOG_MAPPING_FORMAT;
  version: typeof LOG_MAPPING_VERSION;
  time: { column: string; unit: 's' | 'ms' | 'us' };
  pose: {
    position: { columns: [string, string, string]; unit: 'm' | 'mm' };
    orientation: { quaternion: { w: string; x: string; y: string; z: string } };
  };
  joints: JointDraft[];
  tolerances: { rate: string; slip: string };
}

/** Tolerances offered before anyone chose: common practice for servo rate tracking and rolling contacts. */
export const DEFAULT_TOLERANCES = { rate: '0.05 rad/s', slip: '1 mm/s' };

/** A column name reduced for matching: lower case, separators dropped ("Joint_1.Angle" → "joint1angle"). */
const squash = (name: string) => name.toLowerCase().replace(/[\s._\-[\]()/]/g, '');

/** The first header column whose squashed name is one of `candidates` (squashed too), or "". */
function pick(header: readonly string[], candidates: readonly string[]): string {
  const wanted = candidates.map(squash);
  for (const candidate of wanted) {
    const found = header.find((name) => squash(name) === candidate);
    if (found !== undefined) return found;
  }
  return '';
}

/** The joint names of a stored sheet document (its hand's fingers' joints, in order); none when it has no such shape. */
export function sheetJointNames(document: unknown): string[] {
  const fingers = (document as { hand?: { fingers?: unknown } } | null)?.hand?.fingers;
  if (!Array.isArray(fingers)) return [];
  return fingers.flatMap((finger) => {
    const joints = (finger as { joints?: unknown } | null)?.joints;
    return Array.isArray(joints) ? joints.map((joint) => (joint as { name?: unknown } | null)?.name).filter((name): name is string => typeof name === 'string') : [];
  });
}

/** A first mapping from column names alone (every unit SI); columns not recognised stay empty for the user to choose. */
export function guessMapping(header: readonly string[], jointNames: readonly string[]): MappingDraft {
  const axis = (a: string) => pick(header, [`p${a}`, `pos${a}`, `position${a}`, a, `${a}m`]);
  const part = (p: string) => pick(header, [`q${p}`, `quat${p}`, `quaternion${p}`, `orientation${p}`]);
  const joints = jointNames.map((joint): JointDraft => {
    const angle = pick(header, [`${joint}.angle`, `${joint}_angle`, `${joint}_pos`, `${joint}.position`, joint]);
    const commanded = pick(header, [`${joint}.commanded`, `${joint}_cmd`, `${joint}.cmd`, `${joint}_commanded`, `${joint}_rate_cmd`]);
    const measured = pick(header, [`${joint}.measured`, `${joint}_meas`, `${joint}.meas`, `${joint}_measured`, `${joint}_vel`, `${joint}_rate`]);
    return {
      joint,
      ...(angle ? { angle: { column: angle, unit: 'rad' as const } } : {}),
      ...(commanded ? { commandedRate: { column: commanded, unit: 'rad/s' as const } } : {}),
      ...(measured ? { measuredRate: { column: measured, unit: 'rad/s' as const } } : {}),
    };
  });
  return {
    format: LOG_MAPPING_FORMAT,
    version: LOG_MAPPING_VERSION,
    time: { column: pick(header, ['t', 'time', 'time_s', 'timestamp', 'stamp', 'sec']), unit: 's' },
    pose: {
      position: { columns: [axis('x'), axis('y'), axis('z')], unit: 'm' },
      orientation: { quaternion: { w: part('w'), x: part('x'), y: part('y'), z: part('z') } },
    },
    joints: joints.filter((j) => j.angle || j.commandedRate || j.measuredRate),
    tolerances: { ...DEFAULT_TOLERANCES },
  };
}
