import type { ErrorKind, Result } from '../result';
import type { SheetIssue } from '../sheet/schema';

const STATUS_OF: Record<ErrorKind, number> = { 'not-found': 404, forbidden: 403, stale: 409, invalid: 400 };

/** The one mapping from a domain result to HTTP: the value with `successStatus`, or `{ error }` with the status of its kind. */
export function respond<T>(result: Result<T>, successStatus = 200): Response {
  if (result.ok) return Response.json(result.value, { status: successStatus });
  const { kind, ...error } = result.error;
  return Response.json({ error }, { status: STATUS_OF[kind] });
}

/** The error for a sheet document that failed validation: the first issue's message and path under `field`, and all issues. */
export function documentIssues(issues: SheetIssue[], field = 'document') {
  const [first] = issues;
  return { kind: 'invalid' as const, message: first?.message ?? 'Invalid sheet document.', path: first ? `${field}.${first.path}` : field, issues };
}

/** 400 for a sheet document that failed validation: the first issue's message and path, and all issues. */
export function invalidDocument(issues: SheetIssue[]): Response {
  return respond({ ok: false, error: documentIssues(issues) });
}
