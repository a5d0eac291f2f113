import type { APIRoute } from 'astro';
import { requirePermission, signInFirst } from '../../../lib/server/access';
import { getDatabase } from '../../../lib/server/database';
import { respond, validate } from '../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { createSheet, listSheets } from '../../../lib/server/sheets';
import { createSheetBody, listSheetsQuery } from '../../../lib/validation/sheets';

export const GET = (async ({ url, locals }) => {
  if (!locals.identity) return respond(signInFirst());
  const query = validate(listSheetsQuery, { team: locals.team?.teamId, ...Object.fromEntries(url.searchParams) });
  if (!query.ok) return respond(query);
  const access = requirePermission(locals.identity, query.value.team, 'sheet.read');
  if (!access.ok) return respond(access);
  return Response.json(await listSheets(await getDatabase(), query.value));
}) satisfies APIRoute;

export const POST = (async ({ request, locals, clientAddress }) => {
  if (!locals.identity) return respond(signInFirst());
  const body = await parseJsonBody(request, createSheetBody, BODY_LIMITS.sheet);
  if (!body.ok) return respond(body);
  const access = requirePermission(locals.identity, body.value.teamId, 'sheet.write');
  if (!access.ok) return respond(access);
  const { document, ...naming } = body.value;
  return respond(await createSheet(await getDatabase(), { ...naming, document, actor: { userId: access.value.identity.user.id, address: clientAddress } }), 201);
}) satisfies APIRoute;
