import type { Server } from 'node:http';
import type { Logger } from 'pino';

/** How long a stopping server waits for answers in progress and queued writes before closing anyway (ms). */
export const SHUTDOWN_GRACE_MS = 25_000;

export interface ShutdownSteps {
  server: Server;
  /** Writes queued or running in this process (the write queues' sum). */
  pendingWrites: () => number;
  /** Closes the database and anything else left open; runs last. */
  close: () => void;
  logger: Logger;
  graceMs?: number;
}

/**
 * Stops gracefully: stops accepting connections, lets requests in progress finish (idle
 * keep-alive connections close at once), waits for the write queue to empty, then closes. Past
 * `graceMs`, connections still open are cut so a stuck client cannot hold a deploy.
 */
export async function shutDown({ server, pendingWrites, close, logger, graceMs = SHUTDOWN_GRACE_MS }: ShutdownSteps): Promise<void> {
  const deadline = Date.now() + graceMs;
  const closed = new Promise<void>((resolve) => server.close(() => resolve()));
  // A keep-alive connection whose answer finishes during shutdown turns idle afterwards; close those as they appear.
  const idle = setInterval(() => server.closeIdleConnections(), 50);
  const cut = setTimeout(() => server.closeAllConnections(), graceMs);
  await closed;
  clearInterval(idle);
  clearTimeout(cut);
  while (pendingWrites() > 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
  const left = pendingWrites();
  if (left) logger.warn({ pendingWrites: left }, 'shutdown: writes still queued at the deadline');
  close();
  logger.info('shutdown: finished');
}
