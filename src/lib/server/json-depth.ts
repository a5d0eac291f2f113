/**
 * Nesting limit for JSON texts from clients. Sheet documents nest a handful of levels; some
 * readers (jsonc-parser for locating issues, JSON.stringify when storing) recurse once per
 * level and run out of stack on deep texts, so texts are measured before anything parses them.
 */

/** Deepest nesting of lists and objects accepted in a request body or an imported file. */
export const MAX_JSON_DEPTH = 32;

export interface DeepNesting {
  /** Character offset of the bracket that opens one level too many. */
  offset: number;
  /** The top-level field holding the too-deep value, or undefined when the text itself is it. */
  field?: string;
}

/** Where a JSON text first nests deeper than MAX_JSON_DEPTH, or undefined; one pass, no recursion. */
export function findDeepNesting(text: string): DeepNesting | undefined {
  let depth = 0;
  let lastString = '';
  let field: string | undefined;
  let rootIsObject = false;
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
      if (depth > MAX_JSON_DEPTH) return { offset: i, ...(field !== undefined ? { field } : {}) };
    } else if (char === '}' || char === ']') {
      depth -= 1;
    } else if (char === ':' && depth === 1 && rootIsObject) {
      field = lastString;
    }
  }
  return undefined;
}

/** The message for a too-deep text. */
export function deepNestingMessage(what: string): string {
  return `${what} nests lists and objects more than ${MAX_JSON_DEPTH} levels deep; a sheet document needs far fewer`;
}
