import type { z } from 'zod';
import { errorResponse } from './access';
import { deepNestingMessage, findDeepNesting } from './json-depth';

/** Path of an issue about the request body as a whole. */
export const BODY_PATH = '(body)';

export type ParsedBody<T> = { ok: true; data: T } | { ok: false; response: Response };

/** 400 with the first failing field's message and path. */
export function invalidInput(error: z.ZodError): Response {
  const [issue] = error.issues;
  return errorResponse(400, issue.message, issue.path.join('.') || BODY_PATH);
}

/**
 * Reads a JSON request body and validates it; 400 with the first failing field's path otherwise.
 * An empty body is validated as `undefined`, so schemas with defaults accept it.
 */
export async function parseJsonBody<S extends z.ZodType>(request: Request, schema: S): Promise<ParsedBody<z.infer<S>>> {
  let raw: unknown;
  try {
    const text = await request.text();
    const deep = findDeepNesting(text);
    if (deep) return { ok: false, response: errorResponse(400, `${deepNestingMessage('The request')}.`, deep.field ?? BODY_PATH) };
    raw = text.trim() ? JSON.parse(text) : undefined;
  } catch {
    return { ok: false, response: errorResponse(400, 'Send a JSON body.', BODY_PATH) };
  }
  const parsed = schema.safeParse(raw);
  return parsed.success ? { ok: true, data: parsed.data } : { ok: false, response: invalidInput(parsed.error) };
}
