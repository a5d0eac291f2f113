import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { forkSheet } from '../../../../lib/server/sheets';
import { forkBody } from '../../../../lib/validation/sheets';

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const source = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!source.ok) return source.response;
  const { database, sheet } = source;
  const body = await parseJsonBody(request, forkBody, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const targetTeamId = body.data.teamId ?? sheet.teamId;
  const access = requirePermission(source.identity, targetTeamId, 'sheet.write');
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
