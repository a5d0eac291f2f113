import type { APIRoute } from 'astro';
import { errorResponse, requirePermission } from '../../../lib/server/access';
import { recordAudit } from '../../../lib/server/audit';
import { getDatabase } from '../../../lib/server/database';
import { readJson } from '../../../lib/server/http';
import { readSheetFile } from '../../../lib/server/sheet-files';
import { createSheet } from '../../../lib/server/sheets';
import { importBody } from '../../../lib/validation/sheet-exchange';
import { invalidInput } from '../../../lib/server/request-body';

/** The fields of a multipart upload (a `file` part plus `teamId` and optional `title`) or of a JSON body. */
async function readImportRequest(request: Request): Promise<unknown> {
  if (!request.headers.get('content-type')?.startsWith('multipart/form-data')) return readJson(request);
  const form = await request.formData().catch(() => null);
  if (!form) return undefined;
  const file = form.get('file');
  const title = form.get('title');
  return {
    teamId: form.get('teamId') ?? undefined,
    fileName: file instanceof File ? file.name : undefined,
    content: file instanceof File ? await file.text() : undefined,
    title: typeof title === 'string' && title.trim() ? title : undefined,
  };
}

export const POST = (async ({ request, locals, clientAddress }) => {
  const body = importBody.safeParse(await readImportRequest(request));
  if (!body.success) {
    if (!locals.identity) return errorResponse(401, 'Sign in first.');
    return invalidInput(body.error);
  }
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
