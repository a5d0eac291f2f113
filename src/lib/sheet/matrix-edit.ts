/**
 * Editing the test matrix of a sheet document as written (unit strings kept), for the editor and
 * the matrix panel. A leaf module the browser may import.
 */
import { getAt, setAt } from './document-path';

/** A generator as written in a sheet: the spread angle as a quantity text such as "60 deg". */
export type WrittenGenerator =
  | { kind: 'spread-axes'; count: number; angle: string | number; group?: string }
  | { kind: 'random'; count: number; seed: number; group?: string };

/**
 * A copy of the document with the generators appended to matrix.generators, creating the section
 * (and the list) when absent, so generators tried in the panel are kept with the next revision.
 */
export function keepGenerators<T>(document: T, generators: readonly WrittenGenerator[]): T {
  const written = getAt(document, ['matrix', 'generators']);
  const current = Array.isArray(written) ? written : [];
  return setAt(document, ['matrix', 'generators'], [...current, ...generators]);
}

