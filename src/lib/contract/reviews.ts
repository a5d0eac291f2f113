/** Checking states, signatures, remarks and checks as the sheet's checking thread shows them. */

/** Where one revision stands in checking: every saved revision starts as a draft until a checker signs it as checked or returns it. */
export const REVIEW_STATES = ['draft', 'checked', 'returned'] as const;
export type ReviewState = (typeof REVIEW_STATES)[number];

/** What a checker may sign on a revision: checked, or returned for correction. */
export type Verdict = Exclude<ReviewState, 'draft'>;

/** How each checking state reads on the sheet list, the title block and the report. */
export const REVIEW_STATE_LABELS: Record<ReviewState, string> = {
  draft: 'draft',
  checked: 'checked',
  returned: 'returned for correction',
};

/** One remark on a revision (GET /api/sheets/:id/comments lists them as `items`, oldest first). */
export interface SheetComment {
  id: string;
  revision: number;
  /** Section or output the remark is about, e.g. "results" or "output.slipSpeed". */
  anchor: string | null;
  /** The remark this one answers, or null for a remark that opens a thread. */
  parentId: string | null;
  /** Markdown with $math$, as written; the page renders it sanitised. */
  body: string;
  /** The body as sanitised HTML with typeset math, safe to insert into the page. */
  html: string;
  authorName: string | null;
  createdAt: Date;
  /** When the thread was marked resolved, or null while it stands open. */
  resolvedAt: Date | null;
  resolvedByName: string | null;
  /** Whether the reader may resolve or reopen this thread (a checker, or the revision's author). */
  canResolve: boolean;
}

/** One signature on a revision: checked, or returned with remarks. */
export interface SheetReview {
  id: string;
  revision: number;
  verdict: Verdict;
  body: string;
  reviewerName: string | null;
  createdAt: Date;
}

/** GET /api/sheets/:id/reviews: the sheet's checking state (its latest revision's) and every signature, newest first. */
export interface ReviewThread {
  status: ReviewState;
  latestRevision: number;
  lastCheckedRevision: number | null;
  items: SheetReview[];
}
