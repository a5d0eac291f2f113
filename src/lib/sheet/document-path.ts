/**
 * Reading, changing, comparing and merging sheet documents as written (JSON with unit strings),
 * addressed by paths of keys and indices such as ['hand', 'fingers', 0, 'roller', 'radius'].
 * The editor never mutates a document: every change returns a copy sharing untouched branches.
 */
import { scalarFirst } from './number-format';

export type DocumentPath = readonly (string | number)[];
export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/** Path of an input location as text: object keys joined by dots, array indices in brackets. */
export function formatIssuePath(path: readonly PropertyKey[]): string {
  let text = '';
  for (const key of path) text = appendPathKey(text, key);
  return text === '' ? '(document)' : text;
}

/** The text of a path one key longer than the path written `text` ('' for the document itself), as formatIssuePath writes it. */
export function appendPathKey(text: string, key: PropertyKey): string {
  if (typeof key === 'number') return `${text}[${key}]`;
  return text === '' ? String(key) : `${text}.${String(key)}`;
}

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

export type DocumentChangeKind = 'added' | 'removed' | 'changed';

/** One difference between two documents: added (no `before`), removed (no `after`) or changed. */
export interface DocumentChange {
  path: (string | number)[];
  kind: DocumentChangeKind;
  before: unknown;
  after: unknown;
}

/**
 * How arrays are walked. "by-index" compares element by element and lists elements past the
 * shorter array as added or removed (for reading: which finger or joint came or went).
 * "whole-when-resized" compares arrays of equal length element by element and counts an array
 * whose length changed as one change of the whole array, so that every change can be re-applied
 * with setAt (for rebasing: a removed element cannot be set at its index).
 */
export type ArrayRule = 'by-index' | 'whole-when-resized';

/** A JSON object (not null, not an array). */
export const isRecord = (value: unknown): value is Record<string, unknown> => value !== null && typeof value === 'object' && !Array.isArray(value);

function walk(before: unknown, after: unknown, arrays: ArrayRule, path: (string | number)[], out: DocumentChange[]): void {
  if (isRecord(before) && isRecord(after)) {
    const keys = [...Object.keys(before), ...Object.keys(after).filter((key) => !Object.hasOwn(before, key))];
    for (const key of keys) {
      if (!Object.hasOwn(after, key)) out.push({ path: [...path, key], kind: 'removed', before: before[key], after: undefined });
      else if (!Object.hasOwn(before, key)) out.push({ path: [...path, key], kind: 'added', before: undefined, after: after[key] });
      else walk(before[key], after[key], arrays, [...path, key], out);
    }
    return;
  }
  if (Array.isArray(before) && Array.isArray(after) && (arrays === 'by-index' || before.length === after.length)) {
    for (let i = 0; i < Math.max(before.length, after.length); i++) {
      if (i >= after.length) out.push({ path: [...path, i], kind: 'removed', before: before[i], after: undefined });
      else if (i >= before.length) out.push({ path: [...path, i], kind: 'added', before: undefined, after: after[i] });
      else walk(before[i], after[i], arrays, [...path, i], out);
    }
    return;
  }
  if (!Object.is(before, after)) out.push({ path, kind: 'changed', before, after });
}

/**
 * Every difference between two JSON documents, in document order. Objects are compared key by
 * key (a key on one side only is added or removed); arrays follow `arrays` (see ArrayRule);
 * any other two values differ unless Object.is holds.
 */
export function diffDocuments(before: unknown, after: unknown, arrays: ArrayRule = 'whole-when-resized'): DocumentChange[] {
  const out: DocumentChange[] = [];
  walk(before, after, arrays, [], out);
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
    if (other && JSON.stringify(other.after) !== JSON.stringify(change.after)) overlapping.push({ path: change.path, kind: 'changed', before: other.after, after: change.after });
    document = setAt(document, change.path, change.after);
  }
  return { document, overlapping };
}

/** A value in a short, readable form for change lists (quaternions w, x, y, z). */
export function describeValue(value: unknown): string {
  if (value === undefined) return '(none)';
  const text = typeof value === 'string' ? value : JSON.stringify(value, scalarFirst);
  return text.length > 80 ? `${text.slice(0, 77)}...` : text;
}

/** Where two JSON trees differ, when they differ in one value that is not a list or an object. */
interface TreeDifference {
  at: (string | number)[] | undefined;
  /** They differ in more than one value, in shape, or `next` holds something other than JSON. */
  more: boolean;
}

const isPlainRecord = (value: object): value is Record<string, unknown> => {
  const prototype = Object.getPrototypeOf(value);
  return prototype === Object.prototype || prototype === null;
};

/** Compares `next` with `previous` (a JSON tree) below `path` (a stack, as it is on return) and notes the difference in `found`. */
function compareTrees(previous: unknown, next: unknown, path: (string | number)[], found: TreeDifference): void {
  const previousIsTree = previous !== null && typeof previous === 'object';
  const nextIsTree = next !== null && typeof next === 'object';
  if (!previousIsTree || !nextIsTree) {
    // Object.is: -0 is read as written, so a sign is a change.
    if (Object.is(previous, next)) return;
    if (previousIsTree || nextIsTree || found.at !== undefined) found.more = true;
    else found.at = [...path];
    return;
  }
  if (Array.isArray(previous)) {
    if (!Array.isArray(next) || next.length !== previous.length) {
      found.more = true;
      return;
    }
    for (let i = 0; i < next.length && !found.more; i++) {
      path.push(i);
      compareTrees(previous[i], next[i], path, found);
      path.pop();
    }
    return;
  }
  if (Array.isArray(next) || !isPlainRecord(next)) {
    found.more = true;
    return;
  }
  const before = previous as Record<string, unknown>;
  const keys = Object.keys(next);
  if (keys.length !== Object.keys(before).length) {
    found.more = true;
    return;
  }
  for (let i = 0; i < keys.length && !found.more; i++) {
    const key = keys[i];
    if (!Object.hasOwn(before, key)) {
      found.more = true;
      return;
    }
    path.push(key);
    compareTrees(before[key], next[key], path, found);
    path.pop();
  }
}

/**
 * How `next` differs from `previous` (a JSON tree): 'none', the path of the one value that is not a list or an object
 * it differs in, or 'more' (more than one value, the shape, or `next` holds something other than JSON).
 */
function findSingleChange(previous: unknown, next: unknown): (string | number)[] | 'none' | 'more' {
  const found: TreeDifference = { at: undefined, more: false };
  compareTrees(previous, next, [], found);
  return found.more ? 'more' : (found.at ?? 'none');
}

/** Where the trail's latest document stands against the one before it: see DocumentTrail. */
export interface TrailStep {
  /** Counts the documents followed: a reader that last read step n - 1 reads step n as `change` of that one. */
  step: number;
  /** The path of the one value that changed ('none', or 'more' for anything else, the first document too). */
  change: (string | number)[] | 'none' | 'more';
  /** The value the change replaced (undefined unless `change` is a path). */
  before: unknown;
}

/** The documents of one editor as they come, each compared once with the one before, for every reader of it. */
export interface DocumentTrail {
  /** The step of `document`: the latest step when it is the document followed last (the same object), else a new one. */
  follow(document: unknown): TrailStep;
}

/**
 * Levels of lists and objects a document trail copies; a sheet has about eight. Its readings go as deep (readings.ts): the
 * page's worker takes whatever it is sent, and 100,000 nested lists would overflow the stack.
 */
export const MAX_DOCUMENT_DEPTH = 64;

/**
 * A trail of one editor's documents, each an edit of the one before (compared without diffDocuments' list of changes).
 * It keeps a copy of the latest document of its own, unless that nests deeper than MAX_DOCUMENT_DEPTH (copying it could
 * overflow the stack; the next document is then 'more'). A document followed may not change afterwards.
 */
export function createDocumentTrail(): DocumentTrail {
  let latest: unknown;
  let written: unknown;
  let copied = false;
  let current: TrailStep = { step: 0, change: 'more', before: undefined };
  return {
    follow(document) {
      if (current.step > 0 && document === latest) return current;
      const change = copied ? findSingleChange(written, document) : 'more';
      let before: unknown;
      if (change === 'more') {
        copied = nestsWithin(document, MAX_DOCUMENT_DEPTH);
        written = copied ? copyTree(document) : undefined;
      } else if (change !== 'none') {
        before = getAt(written, change);
        replaceInTree(written, change, getAt(document, change));
      }
      latest = document;
      current = { step: current.step + 1, change, before };
      return current;
    },
  };
}

/** A copy of a JSON tree that nobody else holds. */
function copyTree(value: unknown): unknown {
  if (value === null || typeof value !== 'object') return value;
  if (Array.isArray(value)) return value.map(copyTree);
  const copy: Record<string, unknown> = {};
  for (const key of Object.keys(value)) copy[key] = copyTree((value as Record<string, unknown>)[key]);
  return copy;
}

/** Whether a JSON tree nests lists and objects `levels` deep at most (walked no further). */
function nestsWithin(value: unknown, levels: number): boolean {
  if (value === null || typeof value !== 'object') return true;
  if (levels === 0) return false;
  for (const key in value) if (!nestsWithin((value as Record<string, unknown>)[key], levels - 1)) return false;
  return true;
}

/** The value at `path` of a JSON tree (one of its own, whose path resolves) set to `value` in place. */
function replaceInTree(tree: unknown, path: readonly (string | number)[], value: unknown): void {
  let holder = tree as Record<string | number, unknown>;
  for (let i = 0; i < path.length - 1; i++) holder = holder[path[i]] as Record<string | number, unknown>;
  holder[path[path.length - 1]] = value;
}
