import type { SheetIssue } from '../sheet/schema';

/** The request's JSON body, or undefined when it is missing or not JSON (zod then reports it). */
export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    return undefined;
  }
}

/** 400 for a sheet document that failed validation: the first issue's message and path, and all issues. */
export function invalidDocument(issues: SheetIssue[]): Response {
  const [first] = issues;
  return Response.json(
    { error: { message: first?.message ?? 'Invalid sheet document.', path: first ? `document.${first.path}` : 'document', issues } },
    { status: 400 },
  );
}
