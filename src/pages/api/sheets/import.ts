import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { getDatabase } from '../../../lib/server/database';
import { BODY_LIMITS, invalidInput, parseJson, readBody } from '../../../lib/server/request-body';
import { respond } from '../../../lib/server/http';
import { importSheet } from '../../../lib/server/sheets';
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
  const { teamId, fileName, content, title } = body.data;
  return respond(await importSheet(await getDatabase(), { teamId, fileName, content, title, actor: { userId: access.identity.user.id, address: clientAddress } }), 201);
}) satisfies APIRoute;
