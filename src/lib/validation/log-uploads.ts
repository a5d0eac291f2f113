import { z } from './zod';

const KIB = 1024;
const MIB = 1024 * KIB;

/** The largest controller log accepted: 500 MiB as uploaded (a gzip log counts compressed). Checked by the server while the log streams in. */
export const MAX_LOG_BYTES = 500 * MIB;

/** The longest file name kept for a log, in characters. */
export const MAX_LOG_FILE_NAME = 200;

/**
 * POST /api/sheets/{id}/logs?fileName=…: the log is the request body (CSV or gzip CSV, told by its
 * bytes); its name comes in the query, as a bare name without folders.
 */
export const logUploadQuery = z.object({
  fileName: z
    .string({ error: 'Give the log file name, e.g. fileName=run-12.csv.' })
    .trim()
    .min(1, 'Give the log file name, e.g. fileName=run-12.csv.')
    .max(MAX_LOG_FILE_NAME)
    .regex(/^[^/\\\u0000-\u001f\u007f]+$/, 'Give a bare file name, without folders or control characters.'),
});
