import type { APIRoute } from 'astro';
import { respond, validateQuery } from '../../../../../../../lib/server/http';
import { comparisonSeriesCsv, comparisonStatisticsCsv, getLogComparison } from '../../../../../../../lib/server/log-comparisons';
import { getLogStorage } from '../../../../../../../lib/server/log-storage';
import { requireSheet } from '../../../../../../../lib/server/sheet-access';
import { comparisonQuery } from '../../../../../../../lib/validation/log-comparisons';

const csvHeaders = (fileName: string) => ({ 'content-type': 'text/csv; charset=utf-8; header=present', 'content-disposition': `attachment; filename="${fileName}"` });

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const query = validateQuery(url, comparisonQuery);
  if (!query.ok) return respond(query);
  const { database, sheet } = access.value;
  if (query.value.format === 'series') {
    const series = await comparisonSeriesCsv(database, getLogStorage(), sheet.id, params.logId ?? '', params.comparisonId ?? '');
    if (!series.ok) return respond(series);
    return new Response(series.value.body, { headers: csvHeaders(series.value.fileName) });
  }
  const found = await getLogComparison(database, sheet.id, params.logId ?? '', params.comparisonId ?? '');
  if (!found.ok || query.value.format === 'json' || !found.value.result) return respond(found);
  const fileName = `comparison-r${found.value.revision}-${found.value.id.slice(0, 8)}.csv`;
  return new Response(comparisonStatisticsCsv(found.value.result), { headers: csvHeaders(fileName) });
}) satisfies APIRoute;
