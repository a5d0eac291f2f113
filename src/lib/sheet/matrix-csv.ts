/**
 * A matrix result as CSV: the safety comment line, one row per run, then after a blank line and a
 * "# groups" line one row per group with its means and standard deviations; units in the names.
 */
import { SAFETY_CSV_COMMENT } from '../safety';
import type { MatrixResult } from './matrix';
import { csvTable } from './results-csv';

/** The result as CSV text with a trailing newline; an empty cell is a value the run or group does not have. */
export function matrixCsv(result: MatrixResult): string {
  const errorUnit = result.metricUnit === 'rad' ? '_rad' : '';
  const runs = csvTable(
    ['run', 'target', 'start', 'group', 'start_label', 'target_qw', 'target_qx', 'target_qy', 'target_qz', 'outcome', 'ticks', 'time_s', `final_error_${result.metric}${errorUnit}`, 'final_position_error_m', 'worst_severity', 'warnings', 'message'],
    result.runs.map((r) => [
      r.index, r.target, r.start, r.group, r.startLabel, r.targetOrientation.w, r.targetOrientation.x, r.targetOrientation.y, r.targetOrientation.z,
      r.outcome, r.ticks, r.time, r.finalError ?? '', r.finalPositionError ?? '', r.worstSeverity, r.warnings.join(' '), r.message ?? '',
    ]),
  );
  const groups = csvTable(
    ['group', 'runs', 'converged', `final_error_mean${errorUnit}`, `final_error_sd${errorUnit}`, 'ticks_mean', 'ticks_sd', 'time_mean_s', 'time_sd_s'],
    result.groups.map((g) => [g.group, g.runs, g.converged, g.finalError.mean ?? '', g.finalError.sd ?? '', g.ticks.mean ?? '', g.ticks.sd ?? '', g.time.mean ?? '', g.time.sd ?? '']),
  );
  const state = result.complete ? '' : ` (stopped after ${result.runs.length} of ${result.totalRuns} runs)`;
  return `${SAFETY_CSV_COMMENT}\n# matrix runs, metric ${result.metric}, threshold ${result.threshold}${state}\n${runs}\n\n# groups\n${groups}\n`;
}
