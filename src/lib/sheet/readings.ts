/**
 * How a document's written quantities read, for the editor's hints ("= 0.012 m" beside a field, the
 * value at the end of each variables line). Computed wherever the sheet is evaluated (the compute
 * worker, the sheet page's server render) so the page itself needs no expression reader; the page
 * imports only the types.
 */
import { MAX_EXPRESSION_LENGTH, formatVariableValue, readQuantityText, readSheetVariables, type ParsedVariables, type QuantityKind, type VariableIssue, type VariableScope } from './units';
import { MAX_DOCUMENT_DEPTH, appendPathKey, createDocumentTrail, formatIssuePath, getAt, type DocumentTrail } from './document-path';

export { MAX_DOCUMENT_DEPTH };

/** One quantity field written as text: the text read, the kind it has (null for none a field takes) and its SI value in that kind's unit. */
export interface FieldReading {
  text: string;
  kind: Exclude<QuantityKind, 'any'> | null;
  value: number;
}

/** The variables text read line by line: each defined variable's SI value as text, and every line's problem. */
export interface VariableReadings {
  /** The text these lines were read from (the editor shows them only beside that text). */
  text: string;
  values: { line: number; value: string }[];
  issues: VariableIssue[];
}

export interface DocumentReadings {
  /** By path text ("hand.fingers[0].roller.radius"); only texts that read as a quantity. */
  fields: Record<string, FieldReading>;
  variables: VariableReadings;
  /** Where the document nests deeper than MAX_DOCUMENT_DEPTH (nothing below is read); such a document is refused there. */
  tooDeep?: { path: string; message: string };
}

/** Free text of the document, never a quantity. */
const TEXT_FIELDS: ReadonlySet<string> = new Set(['title', 'description', 'notes', 'variables', 'tags', 'format']);

/**
 * What a path of the documents read last held: its text, the scope it was read over and its reading (null when it does
 * not read as a quantity), and the paths below it. An edit changes a text or two, so every other text's reading is the
 * one its path already holds, and no path text is written anew.
 */
interface PathReading {
  readonly path: string;
  text: string | undefined;
  scope: VariableScope | undefined;
  reading: FieldReading | null;
  below: Map<string | number, PathReading> | undefined;
}

/** Most paths remembered: a document has a few hundred; past this (keys nobody writes twice) the memory starts afresh. */
const MAX_PATH_READINGS = 20_000;
let pathCount = 0;
let rootReading: PathReading = { path: '', text: undefined, scope: undefined, reading: null, below: undefined };

function pathBelow(node: PathReading, key: string | number): PathReading {
  node.below ??= new Map();
  let child = node.below.get(key);
  if (child === undefined) {
    child = { path: appendPathKey(node.path, key), text: undefined, scope: undefined, reading: null, below: undefined };
    node.below.set(key, child);
    pathCount += 1;
  }
  return child;
}

function readingOfText(text: string, scope: VariableScope): FieldReading | null {
  if (text.trim() === '' || text.length > MAX_EXPRESSION_LENGTH) return null;
  const read = readQuantityText(text, scope);
  return read.ok ? { text, kind: read.kind, value: read.value } : null;
}

/**
 * Reads every string under `value`, whose path `node` holds ('' for the document itself) `depth` levels down, into
 * `out`, every path but those below MAX_DOCUMENT_DEPTH; gives the first node at that depth that holds a list or an object, if any.
 */
function collect(value: unknown, node: PathReading, scope: VariableScope, out: Record<string, FieldReading>, depth: number): PathReading | undefined {
  if (typeof value === 'string') {
    if (node.text !== value || node.scope !== scope) {
      node.reading = readingOfText(value, scope);
      node.text = value;
      node.scope = scope;
    }
    if (node.reading !== null) out[node.path === '' ? '(document)' : node.path] = node.reading;
    return undefined;
  }
  if (value === null || typeof value !== 'object') return undefined;
  if (depth === MAX_DOCUMENT_DEPTH) return node;
  let tooDeep: PathReading | undefined;
  if (Array.isArray(value)) {
    for (let index = 0; index < value.length; index++) {
      const below = collect(value[index], pathBelow(node, index), scope, out, depth + 1);
      tooDeep ??= below;
    }
    return tooDeep;
  }
  for (const key of Object.keys(value)) {
    if (node.path === '' && TEXT_FIELDS.has(key)) continue;
    const below = collect((value as Record<string, unknown>)[key], pathBelow(node, key), scope, out, depth + 1);
    tooDeep ??= below;
  }
  return tooDeep;
}

/**
 * The variables' readings of each variables text read (a shared read of readSheetVariables, kept as long as it is):
 * formatting the values converts each, and the text rarely changes between two evaluations. Nobody changes them.
 */
const variableReadings = new WeakMap<ParsedVariables, VariableReadings>();

function readVariables(text: string, parsed: ParsedVariables): VariableReadings {
  let readings = variableReadings.get(parsed);
  if (readings === undefined) {
    readings = { text, values: [...parsed.lines].map(([name, line]) => ({ line, value: formatVariableValue(parsed.values.get(name)!) })), issues: parsed.issues };
    variableReadings.set(parsed, readings);
  }
  return readings;
}

/** The readings of a whole document and the variables' scope its texts were read over. */
function readWhole(document: unknown): { readings: DocumentReadings; scope: VariableScope } {
  const text = document !== null && typeof document === 'object' ? (document as { variables?: unknown }).variables : undefined;
  const variablesText = typeof text === 'string' ? text : '';
  const parsed = readSheetVariables(variablesText);
  if (pathCount > MAX_PATH_READINGS) {
    rootReading = { path: '', text: undefined, scope: undefined, reading: null, below: undefined };
    pathCount = 0;
  }
  const fields: Record<string, FieldReading> = {};
  const tooDeep = collect(document, rootReading, parsed.values, fields, 0);
  const readings: DocumentReadings = { fields, variables: readVariables(variablesText, parsed) };
  if (tooDeep) readings.tooDeep = { path: tooDeep.path, message: `the document nests lists and objects more than ${MAX_DOCUMENT_DEPTH} levels deep here` };
  return { readings, scope: parsed.values };
}

/** Reads every quantity written as text in a document as written (also one that does not read as a sheet), over its variables, down to MAX_DOCUMENT_DEPTH. */
export function readDocument(document: unknown): DocumentReadings {
  return readWhole(document).readings;
}

/** What a readings reader keeps of the last document it read. */
interface ReadDocument {
  /** Its step on the reader's trail. */
  step: number;
  readings: DocumentReadings;
  scope: VariableScope;
}

/**
 * A reader of readings (as readDocument gives them) for the documents of one editor, each an edit of the one before, on
 * their trail (one of its own when absent; the compute worker shares one with its edit reader): a document that differs
 * from the last one read in one value other than the variables reads that value alone (none in free text) and keeps
 * every other reading, without walking the document; any other document is read whole. The readings it gives share
 * what an edit left alone, so nobody may change them.
 */
export function createReadingsReader(trail: DocumentTrail = createDocumentTrail()): (document: unknown) => DocumentReadings {
  let last: ReadDocument | undefined;
  return (document) => {
    const { step, change } = trail.follow(document);
    if (last !== undefined && last.step === step) return last.readings;
    if (last !== undefined && last.step === step - 1 && change !== 'more') {
      const readings = change === 'none' ? last.readings : readingsAfterEdit(last, change, document);
      if (readings !== undefined) {
        last = { step, readings, scope: last.scope };
        return readings;
      }
    }
    const { readings, scope } = readWhole(document);
    last = readings.tooDeep ? undefined : { step, readings, scope };
    return readings;
  };
}

/**
 * The readings of `document`, which differs from the one `last` read in the one value at `path`; undefined when that
 * value needs the whole document read (the variables, a reading that comes or goes, the document itself).
 */
function readingsAfterEdit(last: ReadDocument, path: (string | number)[], document: unknown): DocumentReadings | undefined {
  const top = path[0];
  if (typeof top !== 'string' || top === 'variables') return undefined;
  // Free text is never read as a quantity.
  if (TEXT_FIELDS.has(top)) return last.readings;
  const value = getAt(document, path);
  const key = formatIssuePath(path);
  const reading = typeof value === 'string' ? readingOfText(value, last.scope) : null;
  const fields = last.readings.fields;
  // A reading that comes or goes would move the key in the fields' order: the whole reading gives that order.
  if (Object.hasOwn(fields, key) !== (reading !== null)) return undefined;
  return reading === null ? last.readings : { fields: { ...fields, [key]: reading }, variables: last.readings.variables };
}
