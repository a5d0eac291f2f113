/** Longest stretch (ms) a page's own computation holds the event loop before other requests get a turn. */
export const SLICE_MS = 10;

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
      await new Promise((resolve) => setImmediate(resolve));
      sliceStart = performance.now();
    }
  }
  return mapped;
}
