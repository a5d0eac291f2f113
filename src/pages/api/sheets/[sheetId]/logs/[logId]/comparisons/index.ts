import type { APIRoute } from 'astro';
import { respond } from '../../../../../../../lib/server/http';
import { listComparisonsOfLog, runLogComparison } from '../../../../../../../lib/server/log-comparisons';
import { getLogStorage } from '../../../../../../../lib/server/log-storage';
import { BODY_LIMITS, parseJsonBody } from '../../../../../../../lib/server/request-body';
import { requireSheet } from '../../../../../../../lib/server/sheet-access';
import { runComparisonBody } from '../../../../../../../lib/validation/log-comparisons';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  return respond(await listComparisonsOfLog(database, getLogStorage(), sheet.id, params.logId ?? ''));
}) satisfies APIRoute;

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'log.upload');
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, runComparisonBody, BODY_LIMITS.mapping);
  if (!body.ok) return respond(body);
  const { database, sheet, identity } = access.value;
  const run = await runLogComparison(database, getLogStorage(), {
    sheet,
    uploadId: params.logId ?? '',
    mapping: body.value.mapping,
    revision: body.value.revision,
    actor: { userId: identity.user.id, address: clientAddress },
  });
  return respond(run, 201);
}) satisfies APIRoute;
