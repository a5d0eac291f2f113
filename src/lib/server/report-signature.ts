import type { Database } from '../../db';
import type { ReviewState } from '../contract';
import { findChecker } from './sheet-page';

/** What the print report's "Checked by" cell holds for one revision. */
export type ReportCheckedBy = { state: 'checked'; name: string; at: Date } | { state: 'returned' } | { state: 'draft' };

/**
 * The "Checked by" entry of a revision's print report: the checker and the day of the signature
 * when the revision is signed as checked, the return when it was sent back, else nothing (a
 * blank line to sign by hand on paper).
 */
export async function reportCheckedBy(database: Database, sheetId: string, revision: { number: number; reviewState: ReviewState }): Promise<ReportCheckedBy> {
  if (revision.reviewState === 'returned') return { state: 'returned' };
  const checker = revision.reviewState === 'checked' ? await findChecker(database, sheetId, revision.number) : null;
  return checker ? { state: 'checked', name: checker.name, at: new Date(checker.at) } : { state: 'draft' };
}
