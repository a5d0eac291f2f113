import { describe, expect, it } from 'vitest';
import { getDatabase } from '../../../src/lib/server/database';
import { listAuditEvents, recordAudit } from '../../../src/lib/server/audit';
import { addTestMember } from '../../helpers/api-context';

describe('listAuditEvents', () => {
  it('pages newest first without skipping or repeating events that share a timestamp', async () => {
    const database = await getDatabase();
    const { teamId, userId, email } = await addTestMember('owner');
    const other = await addTestMember('owner');
    // One batch insert gives many rows the same millisecond, the case a time-only cursor gets wrong.
    await recordAudit(database, Array.from({ length: 7 }, (_, i) => ({ teamId, actorId: userId, action: 'token.create', subject: `token:${i}` })));
    await recordAudit(database, { teamId: other.teamId, actorId: other.userId, action: 'token.create', subject: 'elsewhere' });
    await recordAudit(database, { teamId, actorId: null, action: 'demo.seed' });

    const seen: string[] = [];
    let before: string | undefined;
    let pages = 0;
    do {
      const page = await listAuditEvents(database, teamId, { limit: 3, before });
      seen.push(...page.events.map((e) => e.id));
      before = page.nextCursor ?? undefined;
      pages++;
    } while (before);
    expect(pages).toBe(3);
    expect(new Set(seen).size).toBe(8);

    const all = await listAuditEvents(database, teamId, { limit: 100 });
    expect(all.nextCursor).toBeNull();
    expect(all.events.map((e) => e.id)).toEqual(seen);
    expect(all.events.find((e) => e.action === 'demo.seed')).toMatchObject({ actor: null });
    expect(all.events.find((e) => e.action === 'token.create')?.actor).toEqual({ id: userId, name: expect.any(String), email });
    expect(all.events.some((e) => e.subject === 'elsewhere')).toBe(false);
    const times = all.events.map((e) => e.createdAt.getTime());
    expect([...times].sort((a, b) => b - a)).toEqual(times);
  });

  it('ignores a malformed cursor and caps the page size', async () => {
    const database = await getDatabase();
    const { teamId, userId } = await addTestMember('owner');
    await recordAudit(database, { teamId, actorId: userId, action: 'auth.sign_in' });
    expect((await listAuditEvents(database, teamId, { before: "1' or 1=1 --" })).events).toHaveLength(1);
    expect((await listAuditEvents(database, teamId, { limit: 0 })).events).toHaveLength(1);
  });
});
