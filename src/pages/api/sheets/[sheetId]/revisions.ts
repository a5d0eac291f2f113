import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { invalidDocument } from '../../../../lib/server/http';
import { BODY_LIMITS, invalidInput, parseJsonBody } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { listRevisions, saveRevision, validateDocument } from '../../../../lib/server/sheets';
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
  const checked = validateDocument(body.data.document);
  if (!checked.ok) return invalidDocument(checked.issues);
  const outcome = await saveRevision(database, sheet.id, body.data.baseRevision, {
    inputs: body.data.document,
    summary: checked.summary,
    message: body.data.message,
    title: body.data.title,
    tags: body.data.tags,
    authorId: access.identity.user.id,
  });
  if (outcome.status === 'missing') return errorResponse(404, 'Not found.');
  if (outcome.status === 'stale') {
    return Response.json(
      {
        error: {
          message: `Revision ${outcome.latestRevision} was saved after the revision ${body.data.baseRevision} you started from. Nothing was overwritten: reload, or save your version as a fork.`,
          path: 'baseRevision',
          latestRevision: outcome.latestRevision,
        },
      },
      { status: 409 },
    );
  }
  await recordAudit(database, { teamId: sheet.teamId, actorId: access.identity.user.id, action: 'sheet.save', subject: sheet.id, detail: { revision: outcome.revision }, address: clientAddress });
  return Response.json({ revision: outcome.revision, summary: checked.summary }, { status: 201 });
}) satisfies APIRoute;
