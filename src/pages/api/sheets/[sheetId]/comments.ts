import type { APIRoute } from 'astro';
import { fail } from '../../../../lib/result';
import { can } from '../../../../lib/roles';
import type { Identity } from '../../../../lib/server/access';
import { respond } from '../../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { addComment, listComments, resolveRemark } from '../../../../lib/server/reviews';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { getRevision } from '../../../../lib/server/sheets';
import { commentBody, remarkResolution } from '../../../../lib/validation/reviews';

/** A checker of the sheet's team may resolve any remark; others only those on revisions they wrote. */
function mayCheck(identity: Identity, teamId: string): boolean {
  const role = identity.memberships.find((m) => m.teamId === teamId)?.role;
  return role !== undefined && can(role, 'sheet.review');
}

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  return Response.json({ items: await listComments(database, sheet.id, { userId: identity.user.id, mayCheck: mayCheck(identity, sheet.teamId) }) });
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.comment');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const body = await parseJsonBody(request, commentBody, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const { revision } = body.value;
  if (!(await getRevision(database, sheet.id, revision))) return respond(fail({ kind: 'invalid', message: `Revision ${revision} does not exist.`, path: 'revision' }));
  const created = await addComment(database, { sheet, ...body.value, actor: { userId: identity.user.id, address: clientAddress } });
  return respond(created, 201);
}) satisfies APIRoute;

/** Resolves or reopens a remark thread: the revision's author or a checker. */
export const PATCH = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.comment');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const body = await parseJsonBody(request, remarkResolution, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  return respond(await resolveRemark(database, { sheet, ...body.value, mayCheck: mayCheck(identity, sheet.teamId), actor: { userId: identity.user.id, address: clientAddress } }), 200);
}) satisfies APIRoute;
