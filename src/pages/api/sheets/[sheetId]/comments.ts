import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { readJson } from '../../../../lib/server/http';
import { addComment, listComments } from '../../../../lib/server/reviews';
import { findSheet, getRevision } from '../../../../lib/server/sheets';
import { commentBody } from '../../../../lib/validation/reviews';
import { firstIssue } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  return Response.json({ items: await listComments(database, sheet.id) });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.comment');
  if (!access.ok) return access.response;
  const body = commentBody.safeParse(await readJson(request));
  if (!body.success) {
    const { message, path } = firstIssue(body.error);
    return errorResponse(400, message, path);
  }
  if (!(await getRevision(database, sheet.id, body.data.revision))) return errorResponse(400, `Revision ${body.data.revision} does not exist.`, 'revision');
  const created = await addComment(database, { sheetId: sheet.id, authorId: access.identity.user.id, ...body.data });
  return Response.json(created, { status: 201 });
}) satisfies APIRoute;
