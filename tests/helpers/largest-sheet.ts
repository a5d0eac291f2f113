import { readFileSync } from 'node:fs';
import { largestSheet as largestFrom } from '../../src/lib/sheet/largest-sheet';

/** The largest valid sheet (src/lib/sheet/largest-sheet.ts) built from the peg example, so it solves like a real hand. */
export function largestSheet(): Record<string, unknown> {
  return largestFrom(JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8')));
}
