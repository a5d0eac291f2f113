import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { recordAudit } from '../../../lib/server/audit';
import { getDatabase } from '../../../lib/server/database';
import { BODY_LIMITS, invalidInput, parseJson, readBody } from '../../../lib/server/request-body';
import { readSheetFile } from '../../../lib/server/sheet-files';
import { createSheet } from '../../../lib/server/sheets';
import { importBody } from '../../../lib/validation/sheet-exchange';

/**
 * The fields of a multipart upload (a `file` part plus `teamId` and optional `title`) or of a JSON
 * body, read within the import limit; undefined fields when the body is neither (zod reports them).
 */
async function readImportRequest(request: Request): Promise<{ ok: true; fields: unknown } | { ok: false; response: Response }> {
  const body = await readBody(request, BODY_LIMITS.import);
  if (!body.ok) return body;
  const contentType = request.headers.get('content-type') ?? '';
  if (!contentType.startsWith('multipart/form-data')) {
    try {
      return { ok: true, fields: parseJson(body.bytes) };
    } catch {
      return { ok: true, fields: undefined };
    }
  }
  // Parsed from the counted bytes: Request.formData would read a body of any size.
  const form = await new Response(body.bytes, { headers: { 'content-type': contentType } }).formData().catch(() => null);
  if (!form) return { ok: true, fields: undefined };
  const file = form.get('file');
  const title = form.get('title');
  return {
    ok: true,
    fields: {
      teamId: form.get('teamId') ?? undefined,
      fileName: file instanceof File ? file.name : undefined,
      content: file instanceof File ? await file.text() : undefined,
      title: typeof title === 'string' && title.trim() ? title : undefined,
    },
  };
}

export const POST = (async ({ request, locals, clientAddress }) => {
  // Before the body: an anonymous upload is refused without reading a byte of it.
  if (!locals.identity) return errorResponse(401, 'Sign in first.');
  const fields = await readImportRequest(request);
  if (!fields.ok) return fields.response;
  const body = importBody.safeParse(fields.fields);
  if (!body.success) return invalidInput(body.error);
  const access = requirePermission(locals.identity, body.data.teamId, 'sheet.write');
  if (!access.ok) return access.response;
  const file = readSheetFile(body.data.content);
  if (!file.ok) {
    const [first] = file.issues;
    const where = first.path ? `${first.path}: ` : '';
    return Response.json(
      {
        error: {
          message: file.stage === 'document' ? `${body.data.fileName} is not a valid sheet: ${where}${first.message}` : `${body.data.fileName}: ${first.message}`,
          path: first.path ? `content.${first.path}` : 'content',
          stage: file.stage,
          issues: file.issues,
        },
      },
      { status: 400 },
    );
  }
  const database = await getDatabase();
  const created = await createSheet(database, {
    teamId: body.data.teamId,
    title: body.data.title ?? file.doc.title,
    tags: file.doc.tags,
    inputs: file.document,
    summary: file.summary,
    authorId: access.identity.user.id,
    message: `Imported from ${body.data.fileName}`,
  });
  await recordAudit(database, {
    teamId: body.data.teamId,
    actorId: access.identity.user.id,
    action: 'sheet.import',
    subject: created.sheetId,
    detail: { fileName: body.data.fileName },
    address: clientAddress,
  });
  return Response.json({ ...created, summary: file.summary }, { status: 201 });
}) satisfies APIRoute;
