import type { APIRoute } from 'astro';
import { respond } from '../../../../lib/server/http';
import { listSheetComparisons } from '../../../../lib/server/log-comparisons';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { succeed } from '../../../../lib/result';

export const GET = (async ({ params, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  return respond(succeed(await listSheetComparisons(database, sheet)));
}) satisfies APIRoute;
