import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { compareRevisions, nonFiniteAsText } from '../../../../lib/server/compare';
import { invalidInput } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { findSheet } from '../../../../lib/server/sheets';
import { compareQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const query = compareQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) return invalidInput(query.error);
  const other = query.data.toSheet ? await findSheet(database, query.data.toSheet) : sheet;
  // Another team's sheet answers exactly like a missing one.
  if (!other || !requirePermission(locals.identity, other.teamId, 'sheet.read').ok) return errorResponse(404, 'Not found.', 'toSheet');
  const comparison = await compareRevisions(database, sheet, query.data.from, other, query.data.to);
  if (!comparison) return errorResponse(404, 'One of the two revisions does not exist.', 'revision');
  return new Response(JSON.stringify(comparison, nonFiniteAsText), { headers: { 'content-type': 'application/json' } });
}) satisfies APIRoute;
