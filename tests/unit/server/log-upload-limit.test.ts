import { existsSync, readdirSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { describe, expect, it, vi } from 'vitest';
import { uploads } from '../../../src/db/schema';
import { getDatabase } from '../../../src/lib/server/database';
import * as logsRoute from '../../../src/pages/api/sheets/[sheetId]/logs/index';
import { callRoute, demoIdentity, demoTeamId } from '../../helpers/api-context';
import { createTestSheet } from '../../helpers/test-sheets';

/*
 * The route's limit is MAX_LOG_BYTES: with the constant made small here, the route itself must
 * refuse a chunked upload (no Content-Length) past it while streaming, keeping no row and no file.
 */

const { SMALL_LIMIT } = vi.hoisted(() => ({ SMALL_LIMIT: 4 * 1024 }));

vi.mock('../../../src/lib/validation/log-uploads', async (importOriginal) => ({
  ...(await importOriginal<typeof import('../../../src/lib/validation/log-uploads')>()),
  MAX_LOG_BYTES: SMALL_LIMIT,
}));

/** Every file under `folder`, including half-written `.part` files. */
function filesUnder(folder: string): string[] {
  return existsSync(folder) ? readdirSync(folder, { recursive: true, withFileTypes: true }).filter((entry) => entry.isFile()).map((entry) => entry.name) : [];
}

describe('log upload route limit', () => {
  it('refuses a chunked upload past MAX_LOG_BYTES while it streams (413, connection closed), keeping no row and no file', async () => {
    const database = await getDatabase();
    const { sheetId } = await createTestSheet(database, await demoTeamId(), 'Log limit test sheet');
    const reviewer = await demoIdentity('reviewer');
    const lines = ['t,px,py,pz', ...Array.from({ length: 10_000 }, (_, i) => `${(i * 0.002).toFixed(3)},0.1,0.05,0.12`)];
    const bytes = new TextEncoder().encode(`${lines.join('\n')}\n`);
    let offset = 0;
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (offset >= bytes.length) return controller.close();
        controller.enqueue(bytes.slice(offset, offset + 1024));
        offset += 1024;
      },
    });
    const folder = process.env.LOG_STORAGE_DIR!;
    const filesBefore = filesUnder(folder).length;
    const response = await callRoute(logsRoute.POST, { method: 'POST', path: `/api/sheets/${sheetId}/logs?fileName=long.csv`, params: { sheetId }, body, identity: reviewer });
    expect(response.status).toBe(413);
    expect(response.headers.get('connection')).toBe('close');
    expect(((await response.json()) as { error: { message: string } }).error.message).toContain('4 KiB');
    expect(offset).toBeLessThan(bytes.length);
    expect(await database.db.select().from(uploads).where(eq(uploads.sheetId, sheetId))).toEqual([]);
    expect(filesUnder(folder).length).toBe(filesBefore);
  });
});
