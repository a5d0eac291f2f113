import { describe, expect, it } from 'vitest';
import { GET } from '../../../../src/pages/api/health';

describe('GET /api/health', () => {
  it('answers 200 with the database reachable and every migration applied', async () => {
    const response = await GET();
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body).toMatchObject({ status: 'ok', database: { reachable: true, kind: 'file' } });
    expect(body.migrations.applied).toBe(body.migrations.expected);
    expect(body.migrations.latest).toMatch(/^\d{4}_/);
  });
});
