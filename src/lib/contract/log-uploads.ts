/** Controller logs uploaded to a sheet, as the sheet page lists them and the column-mapping form previews them. */

/** How a stored log is encoded, told by its first bytes (gzip's magic number), never by its name. */
export const LOG_CONTENT_TYPES = ['text/csv', 'application/gzip'] as const;
export type LogContentType = (typeof LOG_CONTENT_TYPES)[number];

/** One uploaded log (GET /api/sheets/:id/logs lists them as `items`, newest first; POST answers one). */
export interface LogUploadSummary {
  id: string;
  sheetId: string | null;
  fileName: string;
  contentType: LogContentType;
  /** Bytes as uploaded (compressed for gzip). */
  byteSize: number;
  /** SHA-256 of the bytes as uploaded, hex. */
  sha256: string;
  uploaderName: string | null;
  createdAt: Date;
}

/** The first lines of a log as CSV cells, decompressed when it is gzip. */
export interface LogPreview {
  header: string[];
  rows: string[][];
}

/** GET /api/sheets/:id/logs/:logId: one log and its first rows. */
export interface LogUploadDetail {
  upload: LogUploadSummary;
  preview: LogPreview;
}
