/**
 * JSON that keeps NaN and the infinities, which results carry on purpose (a latitude not defined for
 * a finger's build, the condition number of a Jacobian that lost rank) and plain JSON turns into
 * null. For a value handed to an island as text, such as the sheet page's first evaluation.
 */

const TAG = '$nonFinite';

/** JSON text of a value, each non-finite number written as {"$nonFinite": "NaN" | "Infinity" | "-Infinity"}. */
export function stringifyKeepingNonFinite(value: unknown): string {
  return JSON.stringify(value, (_key, item: unknown) => (typeof item === 'number' && !Number.isFinite(item) ? { [TAG]: String(item) } : item));
}

/** The value stringifyKeepingNonFinite wrote, with its non-finite numbers back. */
export function parseKeepingNonFinite<T>(text: string): T {
  return JSON.parse(text, (_key, item: unknown) => {
    if (item === null || typeof item !== 'object' || Array.isArray(item)) return item;
    const tagged = (item as Record<string, unknown>)[TAG];
    return typeof tagged === 'string' && Object.keys(item).length === 1 ? Number(tagged) : item;
  }) as T;
}
