import type { APIRoute } from 'astro';
import { requirePermission } from '../../../../lib/server/access';
import { respond } from '../../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../../lib/server/request-body';
import { requireSheet } from '../../../../lib/server/sheet-access';
import { forkSheet } from '../../../../lib/server/sheets';
import { forkBody } from '../../../../lib/validation/sheets';

export const POST = (async ({ params, request, locals, clientAddress }) => {
  const source = await requireSheet(locals.identity, params.sheetId, 'sheet.read');
  if (!source.ok) return respond(source);
  const { database, sheet, identity } = source.value;
  const body = await parseJsonBody(request, forkBody, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const targetTeamId = body.value.teamId ?? sheet.teamId;
  const access = requirePermission(identity, targetTeamId, 'sheet.write');
  if (!access.ok) return respond(access);
  const fork = await forkSheet(database, {
    source: sheet,
    revision: body.value.revision ?? sheet.latestRevision,
    title: body.value.title,
    targetTeamId,
    actor: { userId: identity.user.id, address: clientAddress },
  });
  return respond(fork, 201);
}) satisfies APIRoute;
