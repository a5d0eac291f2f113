import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { compareRevisions, nonFiniteAsText } from '../../../../lib/server/compare';
import { getDatabase } from '../../../../lib/server/database';
import { findSheet } from '../../../../lib/server/sheets';
import { compareQuery } from '../../../../lib/validation/sheet-exchange';
import { firstIssue } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, url, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  const query = compareQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) {
    const { message, path } = firstIssue(query.error);
    return errorResponse(400, message, path);
  }
  const other = query.data.toSheet ? await findSheet(database, query.data.toSheet) : sheet;
  // Another team's sheet answers exactly like a missing one.
  if (!other || !requirePermission(locals.identity, other.teamId, 'sheet.read').ok) return errorResponse(404, 'Not found.', 'toSheet');
  const comparison = await compareRevisions(database, sheet, query.data.from, other, query.data.to);
  if (!comparison) return errorResponse(404, 'One of the two revisions does not exist.', 'revision');
  return new Response(JSON.stringify(comparison, nonFiniteAsText), { headers: { 'content-type': 'application/json' } });
}) satisfies APIRoute;
