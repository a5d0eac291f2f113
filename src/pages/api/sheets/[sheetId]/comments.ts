import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { addComment, listComments } from '../../../../lib/server/reviews';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { getRevision } from '../../../../lib/server/sheets';
import { commentBody } from '../../../../lib/validation/reviews';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  return Response.json({ items: await listComments(database, sheet.id) });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.comment');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const body = await parseJsonBody(request, commentBody, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  if (!(await getRevision(database, sheet.id, body.data.revision))) return errorResponse(400, `Revision ${body.data.revision} does not exist.`, 'revision');
  const created = await addComment(database, { sheetId: sheet.id, authorId: access.identity.user.id, ...body.data });
  return Response.json(created, { status: 201 });
}) satisfies APIRoute;
