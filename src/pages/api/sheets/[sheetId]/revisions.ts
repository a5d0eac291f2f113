import type { APIRoute } from 'astro';
import { respond } from '../../../../lib/server/http';
import { BODY_LIMITS, invalidInput, parseJsonBody } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { listRevisions, saveRevision } from '../../../../lib/server/sheets';
import { listRevisionsQuery, saveRevisionBody } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, locals, url }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const query = listRevisionsQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) return invalidInput(query.error);
  const { database, sheet } = access;
  return Response.json(await listRevisions(database, sheet.id, query.data));
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.write');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const body = await parseJsonBody(request, saveRevisionBody, BODY_LIMITS.sheet);
  if (!body.ok) return body.response;
  const saved = await saveRevision(database, { sheetId: sheet.id, ...body.data, actor: { userId: access.identity.user.id, address: clientAddress } });
  return respond(saved, 201);
}) satisfies APIRoute;
