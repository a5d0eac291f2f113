/**
 * How a document's written quantities read, for the editor's hints ("= 0.012 m" beside a field, the
 * value at the end of each variables line). Computed wherever the sheet is evaluated (the compute
 * worker, the sheet page's server render) so the page itself needs no expression reader; the page
 * imports only the types.
 */
import { MAX_EXPRESSION_LENGTH, formatVariableValue, readQuantityText, readSheetVariables, type ParsedVariables, type QuantityKind, type VariableIssue, type VariableScope } from './units';
import { appendPathKey } from './document-path';

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
}

/** Free text of the document, never a quantity. */
const TEXT_FIELDS: ReadonlySet<string> = new Set(['title', 'description', 'notes', 'variables', 'tags', 'format']);

/** Reads every string under `value`, whose path is written `pathText` ('' for the document itself), into `out`. */
function collect(value: unknown, pathText: string, scope: VariableScope, out: Record<string, FieldReading>): void {
  if (typeof value === 'string') {
    if (value.trim() === '' || value.length > MAX_EXPRESSION_LENGTH) return;
    const read = readQuantityText(value, scope);
    if (read.ok) out[pathText === '' ? '(document)' : pathText] = { text: value, kind: read.kind, value: read.value };
    return;
  }
  if (value === null || typeof value !== 'object') return;
  if (Array.isArray(value)) value.forEach((item, index) => collect(item, appendPathKey(pathText, index), scope, out));
  else for (const key of Object.keys(value)) if (pathText !== '' || !TEXT_FIELDS.has(key)) collect((value as Record<string, unknown>)[key], appendPathKey(pathText, key), scope, out);
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

/** Reads every quantity written as text in a document as written (also one that does not read as a sheet), over its variables. */
export function readDocument(document: unknown): DocumentReadings {
  const text = document !== null && typeof document === 'object' ? (document as { variables?: unknown }).variables : undefined;
  const variablesText = typeof text === 'string' ? text : '';
  const parsed = readSheetVariables(variablesText);
  const fields: Record<string, FieldReading> = {};
  collect(document, '', parsed.values, fields);
  return { fields, variables: readVariables(variablesText, parsed) };
}
