/**
 * zod with the product's words for every check that has no message of its own: limits are
 * stated ("at most 200 characters"), a missing field is named ("document is required"). Every
 * schema imports z from here, so the messages hold wherever a schema is parsed.
 */
import { z } from 'zod';

const EXPECTED: Record<string, string> = {
  string: 'text',
  number: 'a number',
  int: 'a whole number',
  boolean: 'true or false',
  object: 'an object',
  array: 'a list',
  tuple: 'a list',
  nonoptional: 'a value',
};

function unitOf(origin: string, count: number | bigint): string {
  if (origin === 'string') return count === 1 ? ' character' : ' characters';
  if (origin === 'array' || origin === 'set') return count === 1 ? ' item' : ' items';
  if (origin === 'file') return ' bytes';
  return '';
}

/** The message for an issue, or undefined to keep zod's own. */
export function productMessage(issue: z.core.$ZodRawIssue): string | undefined {
  switch (issue.code) {
    case 'invalid_type': {
      if (issue.input === undefined) {
        const field = issue.path?.at(-1);
        return typeof field === 'string' ? `${field} is required` : 'required field is missing';
      }
      const expected = EXPECTED[issue.expected];
      return expected ? `expected ${expected}` : undefined;
    }
    case 'too_big': {
      const { origin, maximum, inclusive } = issue;
      return `${inclusive ? 'at most' : 'less than'} ${maximum}${unitOf(origin, maximum)}`;
    }
    case 'too_small': {
      const { origin, minimum, inclusive } = issue;
      if (origin === 'string' && minimum === 1 && inclusive) return 'must not be empty';
      return `${inclusive ? 'at least' : 'more than'} ${minimum}${unitOf(origin, minimum)}`;
    }
    default:
      return undefined;
  }
}

z.config({ customError: productMessage });

export { z };
