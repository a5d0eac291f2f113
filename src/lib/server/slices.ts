/** Longest stretch (ms) a page's own computation holds the event loop before other requests get a turn. */
export const SLICE_MS = 10;

/** Lets the requests already waiting run before the caller goes on (one turn of the event loop). */
export const yieldToEventLoop = (): Promise<void> => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Maps items in order, letting other requests run (setImmediate) after each `sliceMs` of work, so
 * one long page (hundreds of typeset formulas) never stalls health checks and other users.
 */
export async function mapInSlices<T, R>(items: readonly T[], map: (item: T) => R, sliceMs = SLICE_MS): Promise<R[]> {
  const mapped: R[] = [];
  let sliceStart = performance.now();
  for (const item of items) {
    mapped.push(map(item));
    if (performance.now() - sliceStart >= sliceMs) {
      await yieldToEventLoop();
      sliceStart = performance.now();
    }
  }
  return mapped;
}
