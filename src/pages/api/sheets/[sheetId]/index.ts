import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { recordAudit } from '../../../../lib/server/audit';
import { invalidInput } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { deleteSheet, getRevision, listForks } from '../../../../lib/server/sheets';
import { sheetQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const query = sheetQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) return invalidInput(query.error);
  const wanted = query.data.revision ?? sheet.latestRevision;
  const revision = await getRevision(database, sheet.id, wanted);
  if (!revision) return errorResponse(404, `Revision ${wanted} does not exist.`, 'revision');
  const forks = await listForks(database, sheet.id, access.identity.memberships.map((m) => m.teamId));
  return Response.json({ sheet, revision, forks });
}) satisfies APIRoute;

export const DELETE = (async ({ params, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'team.manage');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  await deleteSheet(database, sheet.id);
  await recordAudit(database, { teamId: sheet.teamId, actorId: access.identity.user.id, action: 'sheet.delete', subject: sheet.id, detail: { title: sheet.title }, address: clientAddress });
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
