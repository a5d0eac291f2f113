/**
 * A worker's warm-up: rounds of throwaway work made while the page is idle, so that its first real request finds the
 * code compiled. Shared by the compute and run workers.
 */

/**
 * Makes `round(0)` … `round(rounds - 1)`, one per deferred task so that a request posted meanwhile waits for one round at
 * most, while `wanted()` holds; a round that throws ends the warm-up (the real request reports the reason).
 */
export function warmUpInTasks(rounds: number, round: (index: number) => void, wanted: () => boolean, defer: (next: () => void) => void): void {
  let made = 0;
  const next = () => {
    if (made === rounds || !wanted()) return;
    try {
      round(made++);
    } catch {
      return;
    }
    defer(next);
  };
  defer(next);
}

/**
 * Calls `next` in a task of its own, after the messages already waiting: through a message port, since a timer nested
 * more than five deep waits at least 4 ms (HTML timers), which stretched 200 warm-up rounds of about a millisecond to
 * about 850 ms in Chromium, so the page's first edits stopped a warm-up half made.
 */
export function nextTask(next: () => void): void {
  const channel = new MessageChannel();
  channel.port1.onmessage = () => {
    channel.port1.close();
    next();
  };
  channel.port2.postMessage(null);
}
