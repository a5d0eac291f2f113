import type { APIRoute } from 'astro';
import { errorResponse } from '../../../../lib/server/access';
import { invalidDocument } from '../../../../lib/server/http';
import { invalidInput } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { exportDocument, exportFileName, exportResultsCsv } from '../../../../lib/server/sheet-files';
import { getRevision } from '../../../../lib/server/sheets';
import { exportQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return access.response;
  const { database, sheet } = access;
  const query = exportQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) return invalidInput(query.error);
  const number = query.data.revision ?? sheet.latestRevision;
  const revision = await getRevision(database, sheet.id, number);
  if (!revision) return errorResponse(404, `Revision ${number} does not exist.`, 'revision');
  const fileName = exportFileName(sheet.title, number, query.data.format);
  const disposition = `attachment; filename="${fileName}"`;
  if (query.data.format === 'json') {
    return new Response(`${JSON.stringify(exportDocument(revision.inputs), null, 2)}\n`, {
      headers: { 'content-type': 'application/json; charset=utf-8', 'content-disposition': disposition },
    });
  }
  const table = exportResultsCsv(revision.inputs);
  if (!table.ok) return invalidDocument(table.issues);
  return new Response(table.csv, { headers: { 'content-type': 'text/csv; charset=utf-8; header=present', 'content-disposition': disposition } });
}) satisfies APIRoute;
