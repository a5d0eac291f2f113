import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { getDatabase } from '../../../../lib/server/database';
import { readJson } from '../../../../lib/server/http';
import { listReviews, submitReview } from '../../../../lib/server/reviews';
import { findSheet, getRevision } from '../../../../lib/server/sheets';
import { reviewBody } from '../../../../lib/validation/reviews';
import { firstIssue } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  return Response.json({ status: sheet.status, items: await listReviews(database, sheet.id) });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.review');
  if (!access.ok) return access.response;
  const body = reviewBody.safeParse(await readJson(request));
  if (!body.success) {
    const { message, path } = firstIssue(body.error);
    return errorResponse(400, message, path);
  }
  if (!(await getRevision(database, sheet.id, body.data.revision))) return errorResponse(400, `Revision ${body.data.revision} does not exist.`, 'revision');
  const review = await submitReview(database, { sheetId: sheet.id, reviewerId: access.identity.user.id, ...body.data });
  await recordAudit(database, {
    teamId: sheet.teamId,
    actorId: access.identity.user.id,
    action: body.data.verdict === 'approved' ? 'sheet.approve' : 'sheet.request_changes',
    subject: sheet.id,
    detail: { revision: body.data.revision },
    address: clientAddress,
  });
  return Response.json(review, { status: 201 });
}) satisfies APIRoute;
