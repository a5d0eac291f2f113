/** The test-matrix result stored with a sheet revision, as the matrix panel reads it. */
import type { MatrixResult } from '../sheet/matrix';

/** GET and POST /api/sheets/:id/revisions/:n/matrix: the revision's matrix result, who computed it and when. */
export interface MatrixResultRecord {
  sheetId: string;
  revision: number;
  result: MatrixResult;
  /** Wall time of the computation on the server, ms. */
  elapsedMs: number;
  createdByName: string | null;
  createdAt: Date;
}
