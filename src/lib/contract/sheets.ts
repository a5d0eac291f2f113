/** Sheets as the browser sees them: list rows, the sheet page, revision history and the stale save. */
import type { SheetSummary, StoredDocument } from '../sheet/summary';
import type { ReviewState } from './reviews';

/** One row of GET /api/sheets: a live sheet with its latest revision's summary and review state. */
export interface SheetRow {
  id: string;
  title: string;
  tags: string[];
  /** The latest revision's checking state, and the newest revision that stands checked. */
  reviewState: ReviewState;
  lastCheckedRevision: number | null;
  latestRevision: number;
  forkedFromSheetId: string | null;
  forkedFromRevision: number | null;
  /** Shown only when the origin lives in the same team, so a fork never reveals another team's sheet. */
  forkedFromTitle: string | null;
  authorId: string | null;
  authorName: string | null;
  updatedAt: Date;
  summary: SheetSummary | null;
}

/** GET /api/sheets: one page of a team's sheets with the total count. */
export interface SheetListPage {
  items: SheetRow[];
  total: number;
  page: number;
  pageSize: number;
}

/** A sheet named with the revision it was forked at. */
export interface SheetLink {
  id: string;
  title: string;
  revision: number;
}

/** Everything the sheet page shows in its title block and hands to the editor. */
export interface SheetPageData {
  /** `reviewState` is the latest revision's; `lastCheckedRevision` the newest revision that stands checked. */
  sheet: { id: string; teamId: string; title: string; reviewState: ReviewState; lastCheckedRevision: number | null; latestRevision: number };
  revision: { number: number; authorName: string | null; createdAt: string; message: string; inputs: unknown };
  /** Checker who signed this revision as checked, if its latest signature is a check. */
  checkedBy: string | null;
  /** When that signature was made (ISO 8601), or null. */
  checkedAt: string | null;
  forkedFrom: SheetLink | null;
  forks: SheetLink[];
  canEdit: boolean;
  /** Teams the identity may fork this sheet into (where it may write sheets). */
  forkTargets: { teamId: string; name: string }[];
}

/** GET /api/sheets/:id?revision=N: the sheet, that revision with its document as stored, and the forks the caller may read. */
export interface SheetRevisionDetail {
  sheet: { id: string; teamId: string; title: string; latestRevision: number };
  revision: { number: number; message: string; authorName: string | null; createdAt: Date; inputs: StoredDocument };
  forks: { id: string; teamId: string; title: string; forkedFromRevision: number | null; latestRevision: number }[];
}

/** One revision in GET /api/sheets/:id/revisions (without its inputs). */
export interface RevisionListItem {
  number: number;
  parentRevision: number | null;
  message: string;
  summary: SheetSummary | null;
  authorId: string | null;
  authorName: string | null;
  createdAt: Date;
}

/** GET /api/sheets/:id/revisions: one page, newest first, with the total and the next page (null on the last). */
export interface RevisionPage {
  items: RevisionListItem[];
  total: number;
  page: number;
  pageSize: number;
  nextPage: number | null;
}

/** What creating, importing or forking a sheet answers (201). */
export interface CreatedSheet {
  sheetId: string;
  revision: number;
  summary: SheetSummary;
}

/** What saving a revision answers (201). */
export interface SavedRevision {
  revision: number;
  summary: SheetSummary;
}

/** The latest revision a stale save missed, with what the client needs to rebase onto it without asking again. */
export interface LatestRevision {
  number: number;
  inputs: StoredDocument;
  message: string;
  authorName: string | null;
}

/** The error of a stale save (409): the latest revision number and the revision itself. */
export interface StaleSaveError {
  message: string;
  path?: string;
  latestRevision: number;
  latest: LatestRevision;
}
