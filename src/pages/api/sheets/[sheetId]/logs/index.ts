import type { APIRoute } from 'astro';
import { respond, validateQuery } from '../../../../../lib/server/http';
import { getLogStorage } from '../../../../../lib/server/log-storage';
import { listLogUploads, storeLogUpload } from '../../../../../lib/server/log-uploads';
import { requireSheet } from '../../../../../lib/server/sheet-access';
import { logUploadQuery, MAX_LOG_BYTES } from '../../../../../lib/validation/log-uploads';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  return Response.json({ items: await listLogUploads(database, sheet.id) });
}) satisfies APIRoute;

export const POST = (async ({ params, url, request, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'log.upload');
  if (!access.ok) return respond(access);
  const query = validateQuery(url, logUploadQuery);
  if (!query.ok) return respond(query);
  const { database, sheet, identity } = access.value;
  const stored = await storeLogUpload(database, getLogStorage(), {
    sheet,
    fileName: query.value.fileName,
    body: request.body,
    declaredLength: request.headers.get('content-length'),
    limit: MAX_LOG_BYTES,
    actor: { userId: identity.user.id, address: clientAddress },
  });
  return respond(stored, 201);
}) satisfies APIRoute;
