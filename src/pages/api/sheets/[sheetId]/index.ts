import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { recordAudit } from '../../../../lib/server/audit';
import { deleteSheet, findSheet, getRevision, listForks } from '../../../../lib/server/sheets';

export const GET = (async ({ params, url, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  const wanted = Number(url.searchParams.get('revision') ?? sheet.latestRevision);
  const revision = Number.isInteger(wanted) ? await getRevision(database, sheet.id, wanted) : null;
  if (!revision) return errorResponse(404, `Revision ${url.searchParams.get('revision')} does not exist.`, 'revision');
  const forks = await listForks(database, sheet.id, locals.identity.memberships.map((m) => m.teamId));
  return Response.json({ sheet, revision, forks });
}) satisfies APIRoute;

export const DELETE = (async ({ params, locals, clientAddress }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'team.manage');
  if (!access.ok) return access.response;
  await deleteSheet(database, sheet.id);
  await recordAudit(database, { teamId: sheet.teamId, actorId: access.identity.user.id, action: 'sheet.delete', subject: sheet.id, detail: { title: sheet.title }, address: clientAddress });
  return new Response(null, { status: 204 });
}) satisfies APIRoute;
