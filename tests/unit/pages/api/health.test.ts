import { describe, expect, it } from 'vitest';
import { isFileUrl } from '../../../../src/db';
import { GET } from '../../../../src/pages/api/health';

describe('GET /api/health', () => {
  it('answers 200 with the database reachable and every migration applied', async () => {
    const response = await GET();
    expect(response.status).toBe(200);
    const body = await response.json();
    // The run's database is a file unless npm run test:sqld put it on a libSQL server.
    const kind = isFileUrl(process.env.DATABASE_URL!) ? 'file' : 'server';
    expect(body).toMatchObject({ status: 'ok', database: { reachable: true, kind } });
    expect(body.database.latencyMs).toBeGreaterThanOrEqual(0);
    expect(body.database.latencyMs).toBeLessThan(5_000);
    expect(body.migrations.applied).toBe(body.migrations.expected);
    expect(body.migrations.latest).toMatch(/^\d{4}_/);
  });
});
