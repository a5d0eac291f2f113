/**
 * A sheet document as written with some of its variables given other values: the worked examples'
 * calculators and quoted numbers change a sheet through its `variables` text, so every field that
 * is written as an expression over a variable follows, exactly as it would in the sheet editor.
 */

/** The line of `text` that defines `name` ("name = value"), or -1. */
function definingLine(lines: readonly string[], name: string): number {
  return lines.findIndex((line) => line.replace(/#.*$/, '').split('=')[0]?.trim() === name);
}

/** The value written for each variable of a document's variables text, by name, in order. */
export function readVariableEntries(document: unknown): Map<string, string> {
  const text = document !== null && typeof document === 'object' ? (document as { variables?: unknown }).variables : undefined;
  const entries = new Map<string, string>();
  if (typeof text !== 'string') return entries;
  for (const line of text.split(/\r?\n/)) {
    const code = line.replace(/#.*$/, '');
    const equals = code.indexOf('=');
    if (equals > 0) entries.set(code.slice(0, equals).trim(), code.slice(equals + 1).trim());
  }
  return entries;
}

/**
 * The document with each named variable's line rewritten to `name = value`; throws a RangeError for
 * a name the document does not define, so a quote or a calculator cannot set a variable nothing reads.
 */
export function withVariables<T>(document: T, values: Readonly<Record<string, string>>): T {
  const names = Object.keys(values);
  if (names.length === 0) return document;
  const text = (document as { variables?: unknown }).variables;
  const lines = typeof text === 'string' ? text.split(/\r?\n/) : [];
  for (const name of names) {
    const index = definingLine(lines, name);
    if (index < 0) throw new RangeError(`the sheet defines no variable "${name}"`);
    lines[index] = `${name} = ${values[name]}`;
  }
  return { ...document, variables: lines.join('\n') };
}
