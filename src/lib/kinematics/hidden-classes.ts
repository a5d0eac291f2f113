/**
 * Keeping V8's hidden classes (maps) of the scene's objects stable, so that the optimised code of the solve and of runs
 * stays valid. Two things threw it away again and again:
 * - Array.prototype.map and flatMap give their result a different elements kind when the calling code is optimised
 *   than when it is not, so arrays made once per scene or run reached the hot loops with two maps ("wrong map");
 * - V8 frees a hidden class two full garbage collections after its last instance died, and code optimised for it is
 *   thrown away with it ("weak objects"). Runs and sweeps make a scene, a result and their own state each, so between
 *   two of them no instance lived, and a run after a collection started from unoptimised code: about twice as slow.
 */

/** items.map(f), as a packed array filled by push. */
export function mapPacked<T, U>(items: readonly T[], f: (item: T, index: number) => U): U[] {
  const out: U[] = [];
  for (let i = 0; i < items.length; i++) out.push(f(items[i]!, i));
  return out;
}

/** The indices i of items with keep(items[i]), in order, as a packed array filled by push. */
export function indicesWhere<T>(items: readonly T[], keep: (item: T) => boolean): number[] {
  const out: number[] = [];
  for (let i = 0; i < items.length; i++) if (keep(items[i]!)) out.push(i);
  return out;
}

const latest = new Map<string, object>();

/** Keeps `instance` alive until the next call with the same kind, so that its hidden classes outlive the work that made it; returns it. */
export function keepLatest<T extends object>(kind: 'scene' | 'result' | 'run', instance: T): T {
  latest.set(kind, instance);
  return instance;
}
