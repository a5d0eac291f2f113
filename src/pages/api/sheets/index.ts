import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { getDatabase } from '../../../lib/server/database';
import { respond } from '../../../lib/server/http';
import { BODY_LIMITS, invalidInput, parseJsonBody } from '../../../lib/server/request-body';
import { createSheet, listSheets } from '../../../lib/server/sheets';
import { createSheetBody, listSheetsQuery } from '../../../lib/validation/sheets';

export const GET = (async ({ url, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const query = listSheetsQuery.safeParse({ team: locals.team?.teamId, ...Object.fromEntries(url.searchParams) });
  if (!query.success) return invalidInput(query.error);
  const access = requirePermission(locals.identity, query.data.team, 'sheet.read');
  if (!access.ok) return access.response;
  return Response.json(await listSheets(await getDatabase(), query.data));
}) satisfies APIRoute;

export const POST = (async ({ request, locals, clientAddress }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const body = await parseJsonBody(request, createSheetBody, BODY_LIMITS.sheet);
  if (!body.ok) return body.response;
  const access = requirePermission(locals.identity, body.data.teamId, 'sheet.write');
  if (!access.ok) return access.response;
  const { document, ...naming } = body.data;
  return respond(await createSheet(await getDatabase(), { ...naming, document, actor: { userId: access.identity.user.id, address: clientAddress } }), 201);
}) satisfies APIRoute;
