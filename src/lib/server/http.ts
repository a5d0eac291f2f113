import type { z } from 'zod';
import { fail, type DomainError, type ErrorKind, type Failure, type Result } from '../result';
import type { SheetIssue } from '../sheet/schema';

/** The one mapping from error kinds to HTTP statuses. */
const STATUS_OF: Record<ErrorKind, number> = {
  invalid: 400,
  unauthenticated: 401,
  forbidden: 403,
  'not-found': 404,
  conflict: 409,
  stale: 409,
  gone: 410,
  'too-large': 413,
  unprocessable: 422,
  'rate-limited': 429,
};

/** Path of an issue about the request body as a whole. */
export const BODY_PATH = '(body)';

/**
 * A failure to read a request body; `closeConnection` once part of it was consumed: the rest can
 * then neither be drained by the server nor be followed by another request on the same connection.
 */
export type BodyFailure = Failure & { closeConnection?: boolean };

/** The HTTP status of an error's kind, for pages that render the error themselves. */
export function statusOf(error: DomainError): number {
  return STATUS_OF[error.kind];
}

/**
 * The one mapping from a result to HTTP: the value as JSON with `successStatus` (and `headers`),
 * or `{ error: { message, path?, ... } }` with the status of its kind.
 */
export function respond<T>(result: Result<T> | BodyFailure, successStatus = 200, headers?: HeadersInit): Response {
  if (result.ok) return Response.json(result.value, { status: successStatus, headers });
  const { kind, ...error } = result.error;
  const response = Response.json({ error }, { status: STATUS_OF[kind] });
  if ('closeConnection' in result && result.closeConnection) response.headers.set('connection', 'close');
  return response;
}

/** 204 for a change that has nothing to answer. */
export function noContent(): Response {
  return new Response(null, { status: 204 });
}

/** The failure for input that did not pass its schema: the first failing field's message and path. */
export function invalidInput(error: z.ZodError): Failure {
  const [issue] = error.issues;
  return fail({ kind: 'invalid', message: issue.message, path: issue.path.join('.') || BODY_PATH });
}

/** `input` (a query, form fields) checked against `schema`: the parsed value, or the first failing field. */
export function validate<S extends z.ZodType>(schema: S, input: unknown): Result<z.infer<S>> {
  const parsed = schema.safeParse(input);
  return parsed.success ? { ok: true, value: parsed.data } : invalidInput(parsed.error);
}

/** The query string of `url` checked against `schema`. */
export function validateQuery<S extends z.ZodType>(url: URL, schema: S): Result<z.infer<S>> {
  return validate(schema, Object.fromEntries(url.searchParams));
}

/** The error for a sheet document that failed validation: the first issue's message and path under `field`, and all issues. */
export function documentIssues(issues: SheetIssue[], field = 'document') {
  const [first] = issues;
  return { kind: 'invalid' as const, message: first?.message ?? 'Invalid sheet document.', path: first ? `${field}.${first.path}` : field, issues };
}
