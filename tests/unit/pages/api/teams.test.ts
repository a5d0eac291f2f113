import { readFileSync } from 'node:fs';
import { count, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { auditEvents, memberships, sheets, teams } from '../../../../src/db/schema';
import { getDatabase } from '../../../../src/lib/server/database';
import * as teamRoute from '../../../../src/pages/api/teams/[teamId]/index';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as sheetRoute from '../../../../src/pages/api/sheets/[sheetId]/index';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';

const example = JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8'));

describe('team settings', () => {
  it('the owner renames the team; the name is validated with its path', async () => {
    const { teamId, identities } = await createTeamWithRoles('rename');
    const rename = (name: unknown) => teamRoute.PATCH(apiContext({ method: 'PATCH', params: { teamId }, body: { name }, identity: identities.owner }));
    expect((await rename('Line 5 cell')).status).toBe(200);
    const [row] = await (await getDatabase()).db.select().from(teams).where(eq(teams.id, teamId));
    expect(row.name).toBe('Line 5 cell');
    const bad = await rename('x');
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.path).toBe('name');
  });

  it('deleting a team needs its slug and removes its members and sheets', async () => {
    const { teamId, identities } = await createTeamWithRoles('delete');
    const database = await getDatabase();
    await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Goes with the team', document: example }, identity: identities.editor }));
    const [team] = await database.db.select().from(teams).where(eq(teams.id, teamId));
    const remove = (confirm: string) => teamRoute.DELETE(apiContext({ method: 'DELETE', params: { teamId }, body: { confirm }, identity: identities.owner }));
    expect((await remove('wrong')).status).toBe(400);
    expect((await remove(team.slug)).status).toBe(204);
    expect((await database.db.select({ n: count() }).from(memberships).where(eq(memberships.teamId, teamId)))[0].n).toBe(0);
    expect((await database.db.select({ n: count() }).from(sheets).where(eq(sheets.teamId, teamId)))[0].n).toBe(0);
  });
});

describe('DELETE /api/sheets/{id}', () => {
  it('the owner deletes a sheet: it disappears for everyone and the deletion is audited', async () => {
    const { teamId, identities } = await createTeamWithRoles('sheet-delete');
    const { sheetId } = await (await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Old check', document: example }, identity: identities.editor }))).json();
    expect((await sheetRoute.DELETE(apiContext({ method: 'DELETE', params: { sheetId }, identity: identities.editor }))).status).toBe(403);
    expect((await sheetRoute.DELETE(apiContext({ method: 'DELETE', params: { sheetId }, identity: identities.owner }))).status).toBe(204);
    expect((await sheetRoute.GET(apiContext({ params: { sheetId }, identity: identities.owner }))).status).toBe(404);
    const events = await (await getDatabase()).db.select().from(auditEvents).where(eq(auditEvents.subject, sheetId));
    expect(events.map((e) => e.action)).toContain('sheet.delete');
  });
});
