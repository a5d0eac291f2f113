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
  warningCodes: string[];
}

/** A revision's document as it was sent and stored (unit strings and expressions unevaluated); it passed validation when stored. */
export type StoredDocument = Record<string, unknown>;
