/**
 * What the command-line tools print for a comparison of a controller log with a sheet: the same
 * JSON and the same exit status whether the comparison ran locally (`compute --log`) or on the
 * server (`check-log`), so a CI job can switch between them without changing how it reads them.
 */
import type { LogComparison } from './compare';

/** Exit status of a comparison outside tolerance (0 within). */
export const OUTSIDE_TOLERANCE = 3;

/** The comparison as the tools print it: `{ title, comparison }`, indented, with a final newline. */
export function comparisonReportJson(title: string, comparison: LogComparison): string {
  return `${JSON.stringify({ title, comparison }, null, 2)}\n`;
}

/** 0 when the comparison is within tolerance, OUTSIDE_TOLERANCE otherwise. */
export function verdictExitCode(comparison: Pick<LogComparison, 'verdict'>): number {
  return comparison.verdict.withinTolerance ? 0 : OUTSIDE_TOLERANCE;
}
