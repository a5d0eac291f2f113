import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { listReviews, submitReview } from '../../../../lib/server/reviews';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { getRevision } from '../../../../lib/server/sheets';
import { reviewBody } from '../../../../lib/validation/reviews';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  return Response.json({
    status: sheet.reviewState,
    latestRevision: sheet.latestRevision,
    lastApprovedRevision: sheet.lastApprovedRevision,
    items: await listReviews(database, sheet.id),
  });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.review');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const body = await parseJsonBody(request, reviewBody, BODY_LIMITS.form);
  if (!body.ok) return body.response;
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
