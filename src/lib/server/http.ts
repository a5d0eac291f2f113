import type { SheetIssue } from '../sheet/schema';

/** 400 for a sheet document that failed validation: the first issue's message and path, and all issues. */
export function invalidDocument(issues: SheetIssue[]): Response {
  const [first] = issues;
  return Response.json(
    { error: { message: first?.message ?? 'Invalid sheet document.', path: first ? `document.${first.path}` : 'document', issues } },
    { status: 400 },
  );
}
