import type { APIRoute } from 'astro';
import { fail } from '../../../../lib/result';
import { notFound } from '../../../../lib/server/access';
import { documentIssues, respond, validateQuery } from '../../../../lib/server/http';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { exportDocument, exportFileName, exportResultsCsv } from '../../../../lib/server/sheet-files';
import { getRevision } from '../../../../lib/server/sheets';
import { exportQuery } from '../../../../lib/validation/sheet-exchange';

export const GET = (async ({ params, url, locals }) => {
  const access = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!access.ok) return respond(access);
  const { database, sheet } = access.value;
  const query = validateQuery(url, exportQuery);
  if (!query.ok) return respond(query);
  const number = query.value.revision ?? sheet.latestRevision;
  const revision = await getRevision(database, sheet.id, number);
  if (!revision) return respond(notFound(`Revision ${number} does not exist.`, 'revision'));
  const fileName = exportFileName(sheet.title, number, query.value.format);
  const disposition = `attachment; filename="${fileName}"`;
  if (query.value.format === 'json') {
    return new Response(`${JSON.stringify(exportDocument(revision.inputs), null, 2)}\n`, {
      headers: { 'content-type': 'application/json; charset=utf-8', 'content-disposition': disposition },
    });
  }
  const table = exportResultsCsv(revision.inputs);
  if (!table.ok) return respond(fail(documentIssues(table.issues)));
  return new Response(table.csv, { headers: { 'content-type': 'text/csv; charset=utf-8; header=present', 'content-disposition': disposition } });
}) satisfies APIRoute;
