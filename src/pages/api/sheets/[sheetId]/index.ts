import type { APIRoute } from 'astro';
import type { SheetRevisionDetail } from '../../../../lib/contract';
import { notFound } from '../../../../lib/server/access';
import { noContent, respond, validateQuery } from '../../../../lib/server/http';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { deleteSheet, getRevision, listForks } from '../../../../lib/server/sheets';
import { sheetQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const query = validateQuery(url, sheetQuery);
  if (!query.ok) return respond(query);
  const wanted = query.value.revision ?? sheet.latestRevision;
  const revision = await getRevision(database, sheet.id, wanted);
  if (!revision) return respond(notFound(`Revision ${wanted} does not exist.`, 'revision'));
  const forks = await listForks(database, sheet.id, identity.memberships.map((m) => m.teamId));
  return Response.json({ sheet, revision, forks } satisfies SheetRevisionDetail);
}) satisfies APIRoute;

export const DELETE = (async ({ params, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'team.manage');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  await deleteSheet(database, sheet.id, { userId: identity.user.id, address: clientAddress });
  return noContent();
}) satisfies APIRoute;
