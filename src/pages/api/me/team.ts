import type { APIRoute } from 'astro';
import { TEAM_COOKIE } from '../../../consts';
import { errorResponse, requireSession } from '../../../lib/server/access';
import { BODY_LIMITS, parseJsonBody } from '../../../lib/server/request-body';
import { switchTeamSchema } from '../../../lib/validation/team';
import { publicOrigin } from '../../../lib/server/public-origin';

const ONE_YEAR_S = 365 * 24 * 60 * 60;

/** Chooses the team the pages work in; the middleware reads the cookie on every request. */
export const PUT = (async ({ locals, request, cookies, url }) => {
  const access = requireSession(locals.identity);
  if (!access.ok) return access.response;
  const body = await parseJsonBody(request, switchTeamSchema, BODY_LIMITS.form);
  if (!body.ok) return body.response;
  const team = access.identity.memberships.find((m) => m.teamId === body.data.teamId);
  if (!team) return errorResponse(404, 'You are not a member of that team.', 'teamId');
  cookies.set(TEAM_COOKIE, team.slug, { httpOnly: true, sameSite: 'lax', secure: publicOrigin(url).startsWith('https:'), path: '/', maxAge: ONE_YEAR_S });
  return Response.json({ team });
}) satisfies APIRoute;
