import type { APIRoute } from 'astro';
import { noContent, respond } from '../../../../../lib/server/http';
import { getLogStorage } from '../../../../../lib/server/log-storage';
import { deleteLogUpload, getLogUpload } from '../../../../../lib/server/log-uploads';
import { requireSheet } from '../../../../../lib/server/sheet-access';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  return respond(await getLogUpload(database, getLogStorage(), sheet.id, params.logId ?? ''));
}) satisfies APIRoute;

export const DELETE = (async ({ params, locals, clientAddress }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'log.upload');
  if (!access.ok) return respond(access);
  const { database, sheet, identity } = access.value;
  const deleted = await deleteLogUpload(database, getLogStorage(), sheet.id, params.logId ?? '', { userId: identity.user.id, address: clientAddress });
  return deleted.ok ? noContent() : respond(deleted);
}) satisfies APIRoute;
