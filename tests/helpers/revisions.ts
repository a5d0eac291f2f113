import { eq } from 'drizzle-orm';
import type { Database } from '../../src/db';
import { sheetRevisions, sheets } from '../../src/db/schema';
import type { StoredDocument } from '../../src/lib/sheet/summary';

/** Appends `count` revisions to a sheet in large batches, the way a long-lived sheet accumulates them. */
export async function addRevisions(database: Database, sheetId: string, count: number, inputs: StoredDocument): Promise<void> {
  await database.transaction(async (tx) => {
    const [{ latest }] = await tx.select({ latest: sheets.latestRevision }).from(sheets).where(eq(sheets.id, sheetId));
    for (let start = 0; start < count; start += 500) {
      const rows = Array.from({ length: Math.min(500, count - start) }, (_, k) => {
        const number = latest + start + k + 1;
        return {
          sheetId,
          number,
          parentRevision: number - 1,
          inputs,
          summary: { fingers: 3, worst: 'none' as const, warningCodes: [] },
          message: `Tuning step ${number}`,
          authorId: null,
        };
      });
      await tx.insert(sheetRevisions).values(rows);
    }
    await tx.update(sheets).set({ latestRevision: latest + count }).where(eq(sheets.id, sheetId));
  });
}
