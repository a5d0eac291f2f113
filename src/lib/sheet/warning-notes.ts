/**
 * A raised warning as a person reads it: what, where (finger and joint by name), the judged value
 * and the threshold it crossed, both in the sheet's display units. The editor's margin notes, the
 * report and the comparison all read it; a leaf module the browser may import.
 */
import { WARNING_CATALOGUE, type SheetWarning, type WarningCode, type WarningSeverity } from '../kinematics';
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from './display-units';
import { formatShownQuantity } from './outputs';

/** The names a note puts in place of indices. */
export interface NamedFinger {
  name: string;
  jointNames: readonly string[];
}

export interface WarningNote {
  code: WarningCode;
  severity: WarningSeverity;
  title: string;
  message: string;
  /** Finger name, or null for a warning of the whole grasp. */
  finger: string | null;
  /** Joint name, or null when the warning concerns the finger (or the grasp) as a whole. */
  joint: string | null;
  /** Where, in words: 'finger "index", joint "index-pivot"', or "grasp". */
  where: string;
  /** The judged value with its unit, e.g. "0.4 mm". */
  value: string;
  /** The threshold with its unit, e.g. "1 mm". */
  threshold: string;
  /** What value and threshold are, from the catalogue. */
  valueMeaning: string;
  thresholdMeaning: string;
}

/** A raised warning with its finger and joint named and its numbers in the display units. */
export function describeWarning(warning: SheetWarning, fingers: readonly NamedFinger[], units: DisplayUnits = DEFAULT_DISPLAY_UNITS): WarningNote {
  const info = WARNING_CATALOGUE[warning.code];
  const owner = warning.finger === undefined ? undefined : fingers[warning.finger];
  const finger = warning.finger === undefined ? null : (owner?.name ?? `finger ${warning.finger + 1}`);
  const joint = warning.finger === undefined || warning.joint === undefined ? null : (owner?.jointNames[warning.joint] ?? `joint ${warning.joint + 1}`);
  const where = finger === null ? 'grasp' : joint === null ? `finger "${finger}"` : `finger "${finger}", joint "${joint}"`;
  return {
    code: warning.code,
    severity: warning.severity,
    title: info.title,
    message: warning.message,
    finger,
    joint,
    where,
    value: formatShownQuantity(warning.value, info.unit, units),
    threshold: formatShownQuantity(warning.threshold, info.unit, units),
    valueMeaning: info.valueMeaning,
    thresholdMeaning: info.thresholdMeaning,
  };
}
