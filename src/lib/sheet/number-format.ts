/** Numbers as the comparison and report pages print them (numbers in SI unless a unit is shown beside them). */

/** Six significant digits; powers of ten outside [1e-4, 1e6); the API's "Infinity"/"NaN" strings and non-finite numbers as symbols. */
export function formatNumber(value: number | string | null | undefined, digits = 6): string {
  if (value === null || value === undefined) return '—';
  const x = typeof value === 'string' ? Number(value) : value;
  if (typeof value === 'string' && Number.isNaN(x) && value !== 'NaN') return value;
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  if (x === 0) return '0';
  const magnitude = Math.abs(x);
  const text = magnitude >= 1e-4 && magnitude < 1e6 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1).replace(/\.?0+e/, 'e');
  return text.replace(/^-/, '−');
}

/** A signed relative difference in percent with three significant digits; "—" when undefined (the reference is 0). */
export function formatRelative(relative: number | null): string {
  if (relative === null) return '—';
  if (relative === 0) return '0 %';
  const percent = relative * 100;
  return `${percent > 0 ? '+' : '−'}${formatNumber(Math.abs(percent), 3)} %`;
}

const QUATERNION_PARTS = ['w', 'x', 'y', 'z'] as const;

/**
 * A JSON.stringify replacer that writes every quaternion {w, x, y, z} scalar first, whatever order its author typed the
 * keys in, so every page reads quaternions in one order.
 */
export function scalarFirst(_key: string, value: unknown): unknown {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return value;
  const keys = Object.keys(value);
  if (keys.length !== 4 || !QUATERNION_PARTS.every((part) => keys.includes(part))) return value;
  const q = value as Record<string, unknown>;
  return Object.fromEntries(QUATERNION_PARTS.map((part) => [part, q[part]]));
}

/** An input value as written in the document: unit strings as they are, vectors and objects as compact JSON, quaternions w, x, y, z. */
export function formatInputValue(value: unknown): string {
  if (value === undefined) return '';
  if (typeof value === 'string') return value;
  return JSON.stringify(value, scalarFirst).replace(/,/g, ', ').replace(/":/g, '": ');
}
