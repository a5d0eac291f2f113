import type { APIRoute } from 'astro';
import { respond, validateQuery } from '../../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { listRevisions, saveRevision } from '../../../../lib/server/sheets';
import { listRevisionsQuery, saveRevisionBody } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, locals, url }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const query = validateQuery(url, listRevisionsQuery);
  if (!query.ok) return respond(query);
  const { database, sheet } = access.value;
  return Response.json(await listRevisions(database, sheet.id, query.value));
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.write');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const body = await parseJsonBody(request, saveRevisionBody, BODY_LIMITS.sheet);
  if (!body.ok) return respond(body);
  const saved = await saveRevision(database, { sheetId: sheet.id, ...body.value, actor: { userId: identity.user.id, address: clientAddress } });
  return respond(saved, 201);
}) satisfies APIRoute;
