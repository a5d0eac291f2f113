import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../../lib/server/access';
import { getDatabase } from '../../../../lib/server/database';
import { invalidDocument } from '../../../../lib/server/http';
import { exportDocument, exportFileName, exportResultsCsv } from '../../../../lib/server/sheet-files';
import { findSheet, getRevision } from '../../../../lib/server/sheets';
import { exportQuery } from '../../../../lib/validation/sheet-exchange';
import { firstIssue } from '../../../../lib/validation/sheets';

export const GET = (async ({ params, url, locals }) => {
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const database = await getDatabase();
  const sheet = await findSheet(database, params.sheetId ?? '');
  if (!sheet) return errorResponse(404, 'Not found.');
  const access = requirePermission(locals.identity, sheet.teamId, 'sheet.read');
  if (!access.ok) return access.response;
  const query = exportQuery.safeParse(Object.fromEntries(url.searchParams));
  if (!query.success) {
    const { message, path } = firstIssue(query.error);
    return errorResponse(400, message, path);
  }
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
