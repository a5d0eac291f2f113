import type { APIRoute } from 'astro';
import { respond, validateQuery } from '../../../../../../../lib/server/http';
import { comparisonStatisticsCsv, getLogComparison } from '../../../../../../../lib/server/log-comparisons';
import { requireSheet } from '../../../../../../../lib/server/sheet-access';
import { comparisonQuery } from '../../../../../../../lib/validation/log-comparisons';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const query = validateQuery(url, comparisonQuery);
  if (!query.ok) return respond(query);
  const { database, sheet } = access.value;
  const found = await getLogComparison(database, sheet.id, params.logId ?? '', params.comparisonId ?? '');
  if (!found.ok || query.value.format === 'json' || !found.value.result) return respond(found);
  const fileName = `comparison-r${found.value.revision}-${found.value.id.slice(0, 8)}.csv`;
  return new Response(comparisonStatisticsCsv(found.value.result), {
    headers: { 'content-type': 'text/csv; charset=utf-8; header=present', 'content-disposition': `attachment; filename="${fileName}"` },
  });
}) satisfies APIRoute;
