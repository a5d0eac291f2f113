import type { APIRoute } from 'astro';
import { TEAM_COOKIE } from '../../../consts';
import { notFound, requireSession } from '../../../lib/server/access';
import { respond } from '../../../lib/server/http';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { switchTeamSchema } from '../../../lib/validation/team';
import { publicOrigin } from '../../../lib/server/public-origin';

const ONE_YEAR_S = 365 * 24 * 60 * 60;

/** Chooses the team the pages work in; the middleware reads the cookie on every request. */
export const PUT = (async ({ locals, request, cookies, url }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return respond(access);
  const body = await parseJsonBody(request, switchTeamSchema, BODY_LIMITS.form);
  if (!body.ok) return respond(body);
  const team = access.value.memberships.find((m) => m.teamId === body.value.teamId);
  if (!team) return respond(notFound('You are not a member of that team.', 'teamId'));
  cookies.set(TEAM_COOKIE, team.slug, { httpOnly: true, sameSite: 'lax', secure: publicOrigin(url).startsWith('https:'), path: '/', maxAge: ONE_YEAR_S });
  return Response.json({ team });
}) satisfies APIRoute;
