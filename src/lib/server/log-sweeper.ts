/**
 * Removes stored controller logs that no upload row refers to. An upload stores its bytes first
 * and inserts its row after, and a deletion removes the row first and the bytes after, so a crash
 * in between leaves bytes nobody can reach: this sweep finds and deletes them. Run by the start
 * command once at start and then hourly; free of astro:env for that reason.
 */
import { inArray } from 'drizzle-orm';
import type { Database } from '../../db';
import { uploads } from '../../db/schema';
import type { LogStorage, StoredLogKey } from './log-storage-backends';

const MINUTE_MS = 60_000;

/**
 * How old stored bytes without a row must be before they are removed. An upload's row follows its
 * bytes within moments, and Node's server ends a request after 5 minutes, so an hour leaves every
 * upload still in flight alone.
 */
export const ORPHAN_GRACE_MS = 60 * MINUTE_MS;

/** How often the start command sweeps. */
export const SWEEP_INTERVAL_MS = 60 * MINUTE_MS;

/** Keys looked up in the database at once: a bounded query however large the storage. */
const LOOKUP_BATCH = 500;

/**
 * The shape of every key the server makes (`<team id>/<upload id>`, both UUIDs): anything else in
 * a shared bucket or folder is not ours to delete.
 */
const UPLOAD_KEY = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}\/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

export interface SweepOutcome {
  /** Keys of the server's shape older than the grace period, checked against the rows. */
  examined: number;
  /** Keys deleted because no upload row refers to them. */
  deleted: string[];
}

/** Deletes the keys of `batch` that no upload row refers to; returns those deleted. */
async function deleteUnreferenced(database: Database, storage: LogStorage, batch: readonly string[]): Promise<string[]> {
  if (!batch.length) return [];
  const rows = await database.db.select({ key: uploads.storageKey }).from(uploads).where(inArray(uploads.storageKey, [...batch]));
  const referenced = new Set(rows.map((row) => row.key));
  const orphans = batch.filter((key) => !referenced.has(key));
  for (const key of orphans) await storage.delete(key);
  return orphans;
}

/** Deletes stored logs that no upload row refers to and that were last written more than `graceMs` before `now`. */
export async function sweepOrphanedLogs(database: Database, storage: LogStorage, { now = Date.now(), graceMs = ORPHAN_GRACE_MS } = {}): Promise<SweepOutcome> {
  const cutoff = now - graceMs;
  const outcome: SweepOutcome = { examined: 0, deleted: [] };
  // A key may be listed twice (a file and its half-written `.part`); it is looked up once.
  const seen = new Set<string>();
  let batch: string[] = [];
  const isCandidate = ({ key, modifiedAt }: StoredLogKey) => UPLOAD_KEY.test(key) && modifiedAt.getTime() < cutoff && !seen.has(key);
  for await (const stored of storage.list()) {
    if (!isCandidate(stored)) continue;
    seen.add(stored.key);
    batch.push(stored.key);
    if (batch.length >= LOOKUP_BATCH) {
      outcome.deleted.push(...(await deleteUnreferenced(database, storage, batch)));
      batch = [];
    }
  }
  outcome.deleted.push(...(await deleteUnreferenced(database, storage, batch)));
  outcome.examined = seen.size;
  return outcome;
}

export interface LogSweeper {
  /** The sweep run at start, settled (a failure is reported, not thrown). */
  readonly firstSweep: Promise<void>;
  stop(): void;
}

/**
 * Sweeps once now and then every `intervalMs` on a timer that does not keep the process alive;
 * a sweep still running when the next is due is not doubled. Failures (storage or database
 * unreachable) are reported through `report` and retried at the next tick.
 */
export function startLogSweeper(
  database: Database,
  storage: LogStorage,
  { intervalMs = SWEEP_INTERVAL_MS, graceMs = ORPHAN_GRACE_MS, report = (line: string) => console.log(line) } = {},
): LogSweeper {
  let running: Promise<void> | null = null;
  const sweep = () => {
    running ??= sweepOrphanedLogs(database, storage, { graceMs })
      .then(({ deleted }) => {
        if (deleted.length) report(`Slipless: removed ${deleted.length} stored controller log file(s) that no upload refers to (left by an interrupted upload or deletion).`);
      })
      .catch((error: unknown) => report(`Slipless: the sweep of orphaned controller log files failed and will be retried: ${error instanceof Error ? error.message : String(error)}`))
      .finally(() => {
        running = null;
      });
    return running;
  };
  const firstSweep = sweep();
  const timer = setInterval(sweep, intervalMs);
  timer.unref();
  return { firstSweep, stop: () => clearInterval(timer) };
}
