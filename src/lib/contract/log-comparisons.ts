/** Comparisons of an uploaded controller log with a sheet revision, as the log comparison panel shows them. */
import type { LogComparison } from '../logs/compare';

export const COMPARISON_STATUSES = ['pending', 'running', 'done', 'failed'] as const;
export type ComparisonStatus = (typeof COMPARISON_STATUSES)[number];

/** One stored comparison of a log with the sheet at `revision`; `result` is the engine's comparison. */
export interface LogComparisonRecord {
  id: string;
  uploadId: string;
  sheetId: string;
  revision: number;
  /** The mapping as it was sent (tolerances as typed), valid by the engine's schema. */
  mapping: unknown;
  status: ComparisonStatus;
  verdict: 'pass' | 'fail' | null;
  result: LogComparison | null;
  createdByName: string | null;
  createdAt: Date;
}

/** GET /api/sheets/:id/logs/:logId/comparisons: the log's comparisons, newest first, and the mapping last used by the team for a log with the same header. */
export interface LogComparisonList {
  items: LogComparisonRecord[];
  /** The mapping as it was sent (tolerances as typed), or null when the team never compared a log with this header. */
  savedMapping: unknown;
}

/** One comparison in a sheet's list: which log, which revision, the verdict and when; without the result. */
export interface SheetComparisonSummary {
  id: string;
  uploadId: string;
  fileName: string;
  revision: number;
  status: ComparisonStatus;
  verdict: 'pass' | 'fail' | null;
  createdByName: string | null;
  createdAt: Date;
}

/** GET /api/sheets/:id/comparisons: the sheet's comparisons of all its logs, newest first, and the sheet's latest revision (to re-run older ones on). */
export interface SheetComparisonList {
  latestRevision: number;
  items: SheetComparisonSummary[];
}
