/**
 * JSON that keeps NaN and the infinities, which results carry on purpose (a latitude not defined for
 * a finger's build, the condition number of a Jacobian that lost rank) and plain JSON turns into
 * null, and the sign of -0, so a value arrives as a worker's structured clone would bring it. For a
 * value handed to an island as text, such as the sheet page's first evaluation.
 */

const TAG = '$nonFinite';

const special = (item: number) => !Number.isFinite(item) || Object.is(item, -0);

/** JSON text of a value, each non-finite number and -0 written as {"$nonFinite": "NaN" | "Infinity" | "-Infinity" | "-0"}. */
export function stringifyKeepingNonFinite(value: unknown): string {
  return JSON.stringify(value, (_key, item: unknown) => (typeof item === 'number' && special(item) ? { [TAG]: Object.is(item, -0) ? '-0' : String(item) } : item));
}

/** The value stringifyKeepingNonFinite wrote, with its non-finite numbers back. */
export function parseKeepingNonFinite<T>(text: string): T {
  return JSON.parse(text, (_key, item: unknown) => {
    if (item === null || typeof item !== 'object' || Array.isArray(item)) return item;
    const tagged = (item as Record<string, unknown>)[TAG];
    return typeof tagged === 'string' && Object.keys(item).length === 1 ? Number(tagged) : item;
  }) as T;
}
