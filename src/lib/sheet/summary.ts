/**
 * What the server stores beside each revision and every list, table and badge reads: declared
 * once here, a leaf module the browser may import.
 */

/** The worst warning severity a solved sheet raised. */
export type WorstSeverity = 'none' | 'note' | 'caution' | 'singular';

/** A revision's stored summary: finger count and its warnings, computed by the kinematics core. */
export interface SheetSummary {
  fingers: number;
  worst: WorstSeverity;
  /** The distinct codes raised, sorted (a badge's tooltip). */
  warningCodes: string[];
  /** How many warnings were raised (a code raised at two fingers counts twice); absent in summaries stored before it was kept. */
  warningCount?: number;
}

/** What a warning badge says, the same in the sheet list, the history, the report and the comparison. */
export interface WarningBadgeText {
  worst: WorstSeverity;
  /** The word for the worst severity, e.g. "caution"; "clean" without warnings. */
  label: string;
  /** The number of raised warnings; null when not known (an old stored summary). */
  count: number | null;
  /** Label and count together, e.g. "caution 3". */
  text: string;
}

const BADGE_LABELS: Record<WorstSeverity, string> = { none: 'clean', note: 'note', caution: 'caution', singular: 'singular' };

/** The one reading of a badge: the worst severity and the number of raised warnings (not of distinct codes). */
export function warningBadgeText(worst: WorstSeverity, count: number | null | undefined): WarningBadgeText {
  const label = BADGE_LABELS[worst];
  const known = typeof count === 'number' && worst !== 'none' ? count : null;
  return { worst, label, count: known, text: known === null ? label : `${label} ${known}` };
}

/** A revision's document as it was sent and stored (unit strings and expressions unevaluated); it passed validation when stored. */
export type StoredDocument = Record<string, unknown>;
