/**
 * The sheet files of the worked examples (content/examples/sheets), bundled as text: a page quotes
 * from the parsed document and "Open as a new sheet" imports the file exactly as it ships.
 */
const FILES: Record<string, string> = import.meta.glob('../../../content/examples/sheets/*.json', { query: '?raw', import: 'default', eager: true });

const BY_NAME = new Map(Object.entries(FILES).map(([path, text]) => [path.slice(path.lastIndexOf('/') + 1), text]));

/** The text of an example sheet file by its file name (e.g. "cell4-trunnion-ball-spin.json"); throws for an unknown file. */
export function exampleSheetText(fileName: string): string {
  const text = BY_NAME.get(fileName);
  if (text === undefined) throw new Error(`no example sheet file "${fileName}" in content/examples/sheets`);
  return text;
}

/** The example's sheets by name without ".json", parsed, in the order the example lists them (its own first). */
export function exampleSheets(fileNames: readonly string[]): Map<string, unknown> {
  return new Map(fileNames.map((file) => [file.replace(/\.json$/, ''), JSON.parse(exampleSheetText(file)) as unknown]));
}
