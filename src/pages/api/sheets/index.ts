import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { recordAudit } from '../../../lib/server/audit';
import { getDatabase } from '../../../lib/server/database';
import { createSheet, listSheets, validateDocument } from '../../../lib/server/sheets';
import { createSheetBody, firstIssue, listSheetsQuery } from '../../../lib/validation/sheets';
import { invalidDocument, readJson } from '../../../lib/server/http';

export const GET = (async ({ url, locals }) => {
  const query = listSheetsQuery.safeParse({ team: locals.team?.teamId, ...Object.fromEntries(url.searchParams) });
  if (!query.success) {
    if (!locals.identity) return errorResponse(401, 'Sign in first.');
    const { message, path } = firstIssue(query.error);
    return errorResponse(400, message, path);
  }
  const access = requirePermission(locals.identity, query.data.team, 'sheet.read');
  if (!access.ok) return access.response;
  return Response.json(await listSheets(await getDatabase(), query.data));
}) satisfies APIRoute;

export const POST = (async ({ request, locals, clientAddress }) => {
  const body = createSheetBody.safeParse(await readJson(request));
  if (!body.success) {
    if (!locals.identity) return errorResponse(401, 'Sign in first.');
    const { message, path } = firstIssue(body.error);
    return errorResponse(400, message, path);
  }
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
