/**
 * Shape limits for JSON texts from clients. Sheet documents nest a handful of levels and hold a
 * few thousand values; some readers (jsonc-parser for locating issues, JSON.stringify when
 * storing) recurse once per level and run out of stack on deep texts, and parsing, validating
 * and locating issues cost time per value while the event loop waits, so texts are measured
 * before anything parses them.
 */

/** Deepest nesting of lists and objects accepted in a request body or an imported file. */
export const MAX_JSON_DEPTH = 32;
/** Most values (list items and object members) in one text; the largest valid sheet has under 2,000. */
export const MAX_JSON_VALUES = 10_000;

export interface OversizedJson {
  /** What is too large: the nesting or the number of values. */
  reason: 'depth' | 'values';
  /** Character offset of the bracket or separator that goes one past the limit. */
  offset: number;
  /** The top-level field holding the offending value, or undefined when the text itself is it. */
  field?: string;
}

/** Where a JSON text first nests deeper than MAX_JSON_DEPTH or holds more than MAX_JSON_VALUES values, or undefined; one pass, no recursion. */
export function findOversizedJson(text: string): OversizedJson | undefined {
  let depth = 0;
  let values = 0;
  let lastString = '';
  let field: string | undefined;
  let rootIsObject = false;
  const found = (reason: OversizedJson['reason'], offset: number): OversizedJson => ({ reason, offset, ...(field !== undefined ? { field } : {}) });
  for (let i = 0; i < text.length; i++) {
    const char = text[i];
    if (char === '"') {
      let end = i + 1;
      while (end < text.length && text[end] !== '"') end += text[end] === '\\' ? 2 : 1;
      lastString = text.slice(i + 1, end);
      i = end;
    } else if (char === '{' || char === '[') {
      if (depth === 0) rootIsObject = char === '{';
      depth += 1;
      values += 1;
      if (depth > MAX_JSON_DEPTH) return found('depth', i);
      if (values > MAX_JSON_VALUES) return found('values', i);
    } else if (char === '}' || char === ']') {
      depth -= 1;
    } else if (char === ',') {
      values += 1;
      if (values > MAX_JSON_VALUES) return found('values', i);
    } else if (char === ':' && depth === 1 && rootIsObject) {
      field = lastString;
    }
  }
  return undefined;
}

/** The message for a text refused by findOversizedJson, e.g. "The file nests lists and objects more than 32 levels deep; ...". */
export function oversizedJsonMessage(what: string, reason: OversizedJson['reason']): string {
  return reason === 'depth'
    ? `${what} nests lists and objects more than ${MAX_JSON_DEPTH} levels deep; a sheet document needs far fewer`
    : `${what} holds more than ${MAX_JSON_VALUES.toLocaleString('en')} values (list items and object members); a sheet document needs far fewer`;
}
