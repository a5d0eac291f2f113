import type { APIRoute } from 'astro';
import { notFound, requirePermission } from '../../../../lib/server/access';
import { compareRevisions, nonFiniteAsText } from '../../../../lib/server/compare';
import { respond, validateQuery } from '../../../../lib/server/http';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { findSheet } from '../../../../lib/server/sheets';
import { compareQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  const query = validateQuery(url, compareQuery);
  if (!query.ok) return respond(query);
  const other = query.value.toSheet ? await findSheet(database, query.value.toSheet) : sheet;
  // Another team's sheet answers exactly like a missing one.
  if (!other || !requirePermission(locals.identity, other.teamId, 'sheet.read').ok) return respond(notFound('Not found.', 'toSheet'));
  const comparison = await compareRevisions(database, sheet, query.value.from, other, query.value.to);
  if (!comparison) return respond(notFound('One of the two revisions does not exist.', 'revision'));
  return new Response(JSON.stringify(comparison, nonFiniteAsText), { headers: { 'content-type': 'application/json' } });
}) satisfies APIRoute;
