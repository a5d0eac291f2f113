import type { APIRoute } from 'astro';
import { fail } from '../../../../lib/result';
import { respond } from '../../../../lib/server/http';
import { publicOrigin } from '../../../../lib/server/public-origin';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { listReviews, submitReview } from '../../../../lib/server/reviews';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { getRevision } from '../../../../lib/server/sheets';
import { reviewBody } from '../../../../lib/validation/reviews';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  return Response.json({
    status: sheet.reviewState,
    latestRevision: sheet.latestRevision,
    lastCheckedRevision: sheet.lastCheckedRevision,
    items: await listReviews(database, sheet.id),
  });
}) satisfies APIRoute;

export const POST = (async ({ params, request, url, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.review');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const body = await parseJsonBody(request, reviewBody, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const { revision } = body.value;
  if (!(await getRevision(database, sheet.id, revision))) return respond(fail({ kind: 'invalid', message: `Revision ${revision} does not exist.`, path: 'revision' }));
  const review = await submitReview(database, { sheet, ...body.value, origin: publicOrigin(url), actor: { userId: identity.user.id, address: clientAddress } });
  return Response.json(review, { status: 201 });
}) satisfies APIRoute;
