import { describe, expect, it } from 'vitest';
import { TEAM_COOKIE } from '../../../../../src/consts';
import { PUT } from '../../../../../src/pages/api/me/team';
import { addTestMember, callRoute, cookieJar, demoIdentity, demoTeamId } from '../../../../helpers/api-context';

describe('PUT /api/me/team', () => {
  it('sets the team cookie (by slug, httpOnly, SameSite=Lax, whole site) for one of the caller\'s teams', async () => {
    const cookies = cookieJar();
    const teamId = await demoTeamId();
    const response = await callRoute(PUT, { method: 'PUT', path: '/api/me/team', identity: await demoIdentity('viewer'), body: { teamId }, cookies });
    expect(response.status).toBe(200);
    expect(await response.json()).toMatchObject({ team: { teamId, slug: 'tarnwhistle-cell4', role: 'viewer' } });
    expect(cookies.values.get(TEAM_COOKIE)).toBe('tarnwhistle-cell4');
    expect(cookies.options.get(TEAM_COOKIE)).toMatchObject({ httpOnly: true, sameSite: 'lax', secure: false, path: '/' });
  });

  it('refuses a team the caller is not in (404, field teamId) and leaves the cookie alone', async () => {
    const cookies = cookieJar();
    const elsewhere = await addTestMember('owner');
    const response = await callRoute(PUT, { method: 'PUT', path: '/api/me/team', identity: await demoIdentity('owner'), body: { teamId: elsewhere.teamId }, cookies });
    expect(response.status).toBe(404);
    expect(await response.json()).toMatchObject({ error: { path: 'teamId' } });
    expect(cookies.values.has(TEAM_COOKIE)).toBe(false);
  });
});
