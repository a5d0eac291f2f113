import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { recordAudit } from '../../../lib/server/audit';
import { getDatabase } from '../../../lib/server/database';
import { invalidDocument } from '../../../lib/server/http';
import { BODY_LIMITS, invalidInput, parseJsonBody } from '../../../lib/server/request-body';
import { createSheet, listSheets, validateDocument } from '../../../lib/server/sheets';
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
  const checked = validateDocument(body.data.document);
  if (!checked.ok) return invalidDocument(checked.issues);
  const database = await getDatabase();
  const created = await createSheet(database, {
    teamId: body.data.teamId,
    title: body.data.title,
    tags: body.data.tags,
    inputs: body.data.document,
    summary: checked.summary,
    authorId: access.identity.user.id,
    message: body.data.message,
  });
  await recordAudit(database, { teamId: body.data.teamId, actorId: access.identity.user.id, action: 'sheet.create', subject: created.sheetId, address: clientAddress });
  return Response.json({ ...created, summary: checked.summary }, { status: 201 });
}) satisfies APIRoute;
