/**
 * The results of a solved sheet as CSV (RFC 4180): one row per finger with the main outputs,
 * each column's SI unit in its name. Shared by the compute command and the export endpoint so
 * both write the same table.
 */
import type { PlainSheetResult } from '../kinematics/index';
import type { SheetDocument } from './types';

function numberText(value: number): string {
  return Number.isFinite(value) ? String(value) : Number.isNaN(value) ? 'NaN' : value > 0 ? 'Infinity' : '-Infinity';
}

/**
 * Text such as a finger name is the sheet author's; a spreadsheet would run it as a formula when
 * it starts with = + - @ tab or carriage return, so it gets a leading quote (OWASP CSV injection
 * guidance). Numbers are written as numbers, so a negative rate stays a number.
 */
function textCell(value: unknown): string {
  const text = String(value ?? '');
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

function csvCell(value: unknown): string {
  const text = typeof value === 'number' ? numberText(value) : textCell(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** A header and rows as CSV text, quoted where needed, without a trailing newline. */
export function csvTable(header: readonly string[], rows: readonly (readonly unknown[])[]): string {
  return [header, ...rows].map((row) => row.map(csvCell).join(',')).join('\n');
}

export const FINGER_COLUMNS = [
  'finger', 'contact_state', 'gap_m', 'normal_speed_m_s', 'tangential_speed_m_s', 'residual_m_s', 'sigma1_m_rad', 'sigma2_m_rad',
  'sigma3_m_rad', 'condition_number', 'manipulability', 'steer_base_rate_rad_s', 'steer_pivot_angle_rad', 'steer_roll_rate_rad_s',
  'steer_residual_m_s', 'warnings',
];

/** One column per joint rate of the full solution, numbered in the sheet's joint order. */
export function rateColumns(maxJoints: number): string[] {
  return Array.from({ length: maxJoints }, (_, k) => `rate${k + 1}_rad_s`);
}

/** One row per finger: FINGER_COLUMNS then the full-solution joint rates, after `prefix`. */
export function fingerRows(result: PlainSheetResult, maxJoints: number, prefix: readonly unknown[] = []): unknown[][] {
  return result.fingers.map((finger, i) => {
    const codes = result.warnings.filter((w) => w.finger === i).map((w) => w.code);
    const rates = Array.from({ length: maxJoints }, (_, k) => finger.full.rates[k] ?? '');
    return [
      ...prefix,
      finger.name, finger.contact.state, finger.contact.gap, finger.contact.normalSpeed, finger.contact.tangentialSpeed,
      finger.full.residualNorm, finger.full.singularValues[0], finger.full.singularValues[1], finger.full.singularValues[2],
      finger.full.conditionNumber, finger.full.manipulability, finger.steer.baseRate, finger.steer.pivotAngle, finger.steer.rollRate,
      finger.steer.residualNorm, codes.join(' '), ...rates,
    ];
  });
}

/** Largest joint count of any finger: the number of rate columns. */
export function maxJointCount(doc: SheetDocument): number {
  return doc.hand.fingers.reduce((n, f) => Math.max(n, f.joints.length), 0);
}

/** The per-finger results table of a solved sheet. */
export function resultsCsv(doc: SheetDocument, result: PlainSheetResult): string {
  const maxJoints = maxJointCount(doc);
  return csvTable([...FINGER_COLUMNS, ...rateColumns(maxJoints)], fingerRows(result, maxJoints));
}
