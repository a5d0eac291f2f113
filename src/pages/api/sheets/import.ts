import type { APIRoute } from 'astro';
import type { Result } from '../../../lib/result';
import { requirePermission, signInFirst } from '../../../lib/server/access';
import { getDatabase } from '../../../lib/server/database';
import { respond, validate, type BodyFailure } from '../../../lib/server/http';
import { BODY_LIMITS, parseJson, readBody } from '../../../lib/server/request-body';
import { importSheet } from '../../../lib/server/sheets';
import { importBody } from '../../../lib/validation/sheet-exchange';

/**
 * The fields of a multipart upload (a `file` part plus `teamId` and optional `title`) or of a JSON
 * body, read within the import limit; undefined fields when the body is neither (zod reports them).
 */
async function readImportRequest(request: Request): Promise<Result<unknown> | BodyFailure> {
  const body = await readBody(request, BODY_LIMITS.import);
  if (!body.ok) return body;
  const contentType = request.headers.get('content-type') ?? '';
  if (!contentType.startsWith('multipart/form-data')) {
    try {
      return { ok: true, value: parseJson(body.value) };
    } catch {
      return { ok: true, value: undefined };
    }
  }
  // Parsed from the counted bytes: Request.formData would read a body of any size.
  const form = await new Response(body.value, { headers: { 'content-type': contentType } }).formData().catch(() => null);
  if (!form) return { ok: true, value: undefined };
  const file = form.get('file');
  const title = form.get('title');
  return {
    ok: true,
    value: {
      teamId: form.get('teamId') ?? undefined,
      fileName: file instanceof File ? file.name : undefined,
      content: file instanceof File ? await file.text() : undefined,
      title: typeof title === 'string' && title.trim() ? title : undefined,
    },
  };
}

export const POST = (async ({ request, locals, clientAddress }) => {
  // Before the body: an anonymous upload is refused without reading a byte of it.
  if (!locals.identity) return respond(signInFirst());
  const fields = await readImportRequest(request);
  if (!fields.ok) return respond(fields);
  const body = validate(importBody, fields.value);
  if (!body.ok) return respond(body);
  const access = requirePermission(locals.identity, body.value.teamId, 'sheet.write');
  if (!access.ok) return respond(access);
  const { teamId, fileName, content, title } = body.value;
  return respond(await importSheet(await getDatabase(), { teamId, fileName, content, title, actor: { userId: access.value.identity.user.id, address: clientAddress } }), 201);
}) satisfies APIRoute;
