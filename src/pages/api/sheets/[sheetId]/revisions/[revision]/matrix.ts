import type { APIRoute } from 'astro';
import { respond, validate } from '../../../../../../lib/server/http';
import { computeMatrixResult, getMatrixResult } from '../../../../../../lib/server/matrix-results';
import { requireSheet } from '../../../../../../lib/server/sheet-access';
import { revisionParam } from '../../../../../../lib/validation/sheets';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const revision = validate(revisionParam, params);
  if (!revision.ok) return respond(revision);
  const { database, sheet } = access.value;
  return respond(await getMatrixResult(database, sheet.id, revision.value.revision));
}) satisfies APIRoute;

/** Runs the revision's matrix on the server (no body) and stores the result with the revision. */
export const POST = (async ({ params, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.write');
  if (!access.ok) return respond(access);
  const revision = validate(revisionParam, params);
  if (!revision.ok) return respond(revision);
  const { database, sheet, identity } = access.value;
  return respond(await computeMatrixResult(database, sheet, revision.value.revision, { userId: identity.user.id, address: clientAddress }), 201);
}) satisfies APIRoute;
