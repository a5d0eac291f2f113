import { describe, expect, it } from 'vitest';
import { parseKeepingNonFinite } from '../../../src/lib/contract';
import { evaluateForPage } from '../../../src/lib/server/sheet-page';
import { inventedPageData, warmUpSheetPage } from '../../../src/lib/server/warm-up-sheet-page';
import type { ComputeReply } from '../../../src/workers/compute-protocol';

describe('warmUpSheetPage', () => {
  it('warms up on a sheet that reads cleanly, so it runs the path every real sheet takes (parse, solve, extras)', () => {
    const reply = parseKeepingNonFinite<ComputeReply>(evaluateForPage(inventedPageData().revision.inputs));
    if (reply.type !== 'computed' || !reply.ok) throw new Error(`the built-in sheet did not read: ${JSON.stringify(reply)}`);
    expect(reply.result.fingers).toHaveLength(3);
  });

  it('renders the page\'s islands on the server without failing', async () => {
    await expect(warmUpSheetPage()).resolves.toBeUndefined();
  }, 60_000);
});
