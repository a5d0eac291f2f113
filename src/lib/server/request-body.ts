import type { z } from 'zod';
import { errorResponse } from './access';

export type ParsedBody<T> = { ok: true; data: T } | { ok: false; response: Response };

/** Reads a JSON request body and validates it; 400 with the first failing field's path otherwise. */
export async function parseJsonBody<S extends z.ZodType>(request: Request, schema: S): Promise<ParsedBody<z.infer<S>>> {
  let raw: unknown;
  try {
    raw = await request.json();
  } catch {
    return { ok: false, response: errorResponse(400, 'Send a JSON body.') };
  }
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, data: parsed.data };
  const [issue] = parsed.error.issues;
  return { ok: false, response: errorResponse(400, issue.message, issue.path.join('.') || undefined) };
}
