/** Reading the JSON files the command-line tools take (sheets, log mappings), with located errors. */
import { readFileSync } from 'node:fs';
import { parseLogMapping, type LogMapping } from '../lib/logs/mapping';
import { jsonSyntaxIssue } from '../lib/server/sheet-files';

/** Bad input named by file (and line and column where known); the tools print it and exit 1. */
export class InputError extends Error {}

/** The parsed JSON of `file`; an InputError locating the syntax error as file:line:column. */
export function readJsonFile(file: string): unknown {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (error) {
    throw new InputError(`${file}: cannot read the file (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    const issue = jsonSyntaxIssue(text);
    if (issue?.line === undefined) throw new InputError(`${file}: invalid JSON: ${(error as Error).message}`);
    throw new InputError(`${file}:${issue.line}:${issue.column}: invalid JSON: ${issue.message}`);
  }
}

/** The log mapping in `file`, as written and as the engine's schema reads it; an InputError naming each failing field. */
export function readMappingFile(file: string): { raw: unknown; mapping: LogMapping } {
  const raw = readJsonFile(file);
  const read = parseLogMapping(raw);
  if (!read.ok) {
    const lines = read.issues.map((issue) => `${file}: ${issue.path}: ${issue.message}`);
    throw new InputError(`${lines.join('\n')}\n${file}: invalid log mapping (${read.issues.length} issue${read.issues.length === 1 ? '' : 's'})`);
  }
  return { raw, mapping: read.mapping };
}
