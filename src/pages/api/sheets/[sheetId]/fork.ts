import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { getDatabase } from '../../../../lib/server/database';
import { readJson } from '../../../../lib/server/http';
import { findSheet, forkSheet } from '../../../../lib/server/sheets';
import { firstIssue, forkBody } from '../../../../lib/validation/sheets';

export const POST = (async ({ params, request, locals, clientAddress }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const source = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!source.ok) return source.response;
  const body = forkBody.safeParse((await readJson(request)) ?? {});
  if (!body.success) {
    const { message, path } = firstIssue(body.error);
    return errorResponse(400, message, path);
  }
  const targetTeamId = body.data.teamId ?? sheet.teamId;
  const access = requirePermission(locals.identity, targetTeamId, 'sheet.write');
  if (!access.ok) return access.response;
  const revision = body.data.revision ?? sheet.latestRevision;
  const fork = await forkSheet(database, sheet, revision, access.identity.user.id, body.data.title, targetTeamId);
  if (!fork) return errorResponse(404, `Revision ${revision} does not exist.`, 'revision');
  await recordAudit(database, [
    { teamId: targetTeamId, actorId: access.identity.user.id, action: 'sheet.fork', subject: fork.sheetId, detail: { from: sheet.id, revision }, address: clientAddress },
    ...(targetTeamId === sheet.teamId
      ? []
      : [{ teamId: sheet.teamId, actorId: access.identity.user.id, action: 'sheet.fork', subject: sheet.id, detail: { to: fork.sheetId, toTeam: targetTeamId, revision }, address: clientAddress }]),
  ]);
  return Response.json(fork, { status: 201 });
}) satisfies APIRoute;
