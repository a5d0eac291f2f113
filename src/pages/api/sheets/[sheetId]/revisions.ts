import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { getDatabase } from '../../../../lib/server/database';
import { invalidDocument, readJson } from '../../../../lib/server/http';
import { findSheet, listRevisions, saveRevision, validateDocument } from '../../../../lib/server/sheets';
import { firstIssue, saveRevisionBody } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  return Response.json({ items: await listRevisions(database, sheet.id) });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.write');
  if (!access.ok) return access.response;
  const body = saveRevisionBody.safeParse(await readJson(request));
  if (!body.success) {
    const { message, path } = firstIssue(body.error);
    return errorResponse(400, message, path);
  }
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
