/**
 * Reading, changing, comparing and merging sheet documents as written (JSON with unit strings),
 * addressed by paths of keys and indices such as ['hand', 'fingers', 0, 'roller', 'radius'].
 * The editor never mutates a document: every change returns a copy sharing untouched branches.
 */
import { formatIssuePath } from './schema';

export type DocumentPath = readonly (string | number)[];
export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/** The value at path, or undefined when the path does not resolve. */
export function getAt(root: unknown, path: DocumentPath): unknown {
  let node = root;
  for (const key of path) {
    if (node === null || typeof node !== 'object') return undefined;
    node = (node as Record<string | number, unknown>)[key];
  }
  return node;
}

/** A copy of root with value at path (created objects along the way); undefined removes an object key. */
export function setAt<T>(root: T, path: DocumentPath, value: unknown): T {
  if (path.length === 0) return value as T;
  const [key, ...rest] = path;
  const base: unknown = root ?? (typeof key === 'number' ? [] : {});
  const next = setAt((base as Record<string | number, unknown>)[key], rest, value);
  if (Array.isArray(base)) {
    const copy = base.slice();
    copy[key as number] = next;
    return copy as T;
  }
  const copy: Record<string, unknown> = { ...(base as Record<string, unknown>) };
  if (next === undefined) delete copy[key as string];
  else copy[key as string] = next;
  return copy as T;
}

/** The same path as text, in the form parseSheet uses for issue locations ("hand.fingers[0].roller.radius"). */
export function pathText(path: DocumentPath): string {
  return formatIssuePath(path);
}

export interface DocumentChange {
  path: (string | number)[];
  before: unknown;
  after: unknown;
}

const isRecord = (value: unknown): value is Record<string, unknown> => value !== null && typeof value === 'object' && !Array.isArray(value);

/**
 * Every leaf that differs between two documents. Objects are compared key by key and arrays of
 * equal length element by element; an array whose length changed (a finger or joint added or
 * removed) counts as one change of the whole array.
 */
export function diffDocuments(before: unknown, after: unknown, path: (string | number)[] = [], out: DocumentChange[] = []): DocumentChange[] {
  if (isRecord(before) && isRecord(after)) {
    const keys = new Set([...Object.keys(before), ...Object.keys(after)]);
    for (const key of keys) diffDocuments(before[key], after[key], [...path, key], out);
  } else if (Array.isArray(before) && Array.isArray(after) && before.length === after.length) {
    before.forEach((item, index) => diffDocuments(item, after[index], [...path, index], out));
  } else if (JSON.stringify(before) !== JSON.stringify(after)) {
    out.push({ path, before, after });
  }
  return out;
}

export interface Rebased<T> {
  document: T;
  /** Paths that both sides changed, to different values; the re-applied (own) value was kept. */
  overlapping: DocumentChange[];
}

/**
 * Re-applies the changes made from `base` to `mine` on top of `theirs` (a later revision):
 * three-way, leaf by leaf; where both sides changed the same leaf, one's own value wins and the
 * leaf is listed so that the person can check it.
 */
export function rebaseDocument<T>(base: T, mine: T, theirs: T): Rebased<T> {
  const theirChanges = new Map(diffDocuments(base, theirs).map((c) => [pathText(c.path), c]));
  let document = theirs;
  const overlapping: DocumentChange[] = [];
  for (const change of diffDocuments(base, mine)) {
    const other = theirChanges.get(pathText(change.path));
    if (other && JSON.stringify(other.after) !== JSON.stringify(change.after)) overlapping.push({ path: change.path, before: other.after, after: change.after });
    document = setAt(document, change.path, change.after);
  }
  return { document, overlapping };
}

/** A value in a short, readable form for change lists. */
export function describeValue(value: unknown): string {
  if (value === undefined) return '(none)';
  const text = typeof value === 'string' ? value : JSON.stringify(value);
  return text.length > 80 ? `${text.slice(0, 77)}...` : text;
}
