/** Review states, verdicts, comments and reviews as the sheet's review thread shows them. */

/** Where one revision stands in review: every saved revision starts as a draft until a reviewer gives a verdict on it. */
export const REVIEW_STATES = ['draft', 'approved', 'changes-requested'] as const;
export type ReviewState = (typeof REVIEW_STATES)[number];

/** What a reviewer may decide about a revision. */
export type Verdict = Exclude<ReviewState, 'draft'>;

/** One comment on a revision (GET /api/sheets/:id/comments lists them as `items`). */
export interface SheetComment {
  id: string;
  revision: number;
  /** Section or output the comment is about, e.g. "results". */
  anchor: string | null;
  body: string;
  authorName: string | null;
  createdAt: Date;
}

/** One verdict on a revision. */
export interface SheetReview {
  id: string;
  revision: number;
  verdict: Verdict;
  body: string;
  reviewerName: string | null;
  createdAt: Date;
}

/** GET /api/sheets/:id/reviews: the sheet's review state (its latest revision's) and every review, newest first. */
export interface ReviewThread {
  status: ReviewState;
  latestRevision: number;
  lastApprovedRevision: number | null;
  items: SheetReview[];
}
