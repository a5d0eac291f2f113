import type { ComponentType } from 'react';
import type { SheetPageData } from '../contract';
import { createSheetFromTemplate } from '../sheet/templates';
import { sheetJointNames } from '../view/log-mapping-draft';
import { yieldToEventLoop } from './slices';

/** Page renders of the invented sheet: the sheet page answered in about 450, 120 and 110 ms before its answers settled near 45 ms. */
const WARM_UP_RENDERS = 4;

/** A sheet nobody owns (a built-in template), shaped as the sheet page hands it to its editor island. */
export function inventedPageData(): SheetPageData {
  const document = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
  return {
    sheet: { id: 'warm-up', teamId: 'warm-up', title: document.title, reviewState: 'draft', lastCheckedRevision: null, latestRevision: 1 },
    revision: { number: 1, authorName: null, createdAt: new Date(0).toISOString(), message: '', inputs: document },
    checkedBy: null,
    checkedAt: null,
    forkedFrom: null,
    forks: [],
    canEdit: true,
    forkTargets: [],
  };
}

/**
 * Runs the sheet page's server work (its first evaluation, the server render of its islands through React's
 * stream renderer, as Astro's React renderer calls it) a few times on a built-in sheet, one step per turn of the
 * event loop so requests that arrive meanwhile are answered between steps. Without it the first people to open a
 * sheet after a start wait for that code to load and compile (the first answer took about ten times a settled one).
 */
export async function warmUpSheetPage(): Promise<void> {
  const [{ evaluateForPage }, { default: SheetEditor }, { default: ReviewPanel }, { default: LogsPanel }, React, ReactDOMServer] = await Promise.all([
    import('./sheet-page'),
    import('../../components/sheet/SheetEditor'),
    import('../../components/sheet/ReviewPanel'),
    import('../../components/sheet/LogsPanel'),
    import('react'),
    import('react-dom/server'),
  ]);
  const data = inventedPageData();
  const { id: sheetId } = data.sheet;
  const revision = data.revision.number;
  const render = async <P extends object>(island: ComponentType<P>, props: P) =>
    new Response(await ReactDOMServer.renderToReadableStream(React.createElement(island, props))).text();
  for (let round = 0; round < WARM_UP_RENDERS; round++) {
    await yieldToEventLoop();
    const evaluation = evaluateForPage(data.revision.inputs);
    await yieldToEventLoop();
    await render(SheetEditor, { data, evaluation });
    await yieldToEventLoop();
    await render(ReviewPanel, { sheetId, revision, canComment: true, canReview: true });
    await render(LogsPanel, { sheetId, revision, canUpload: true, jointNames: sheetJointNames(data.revision.inputs) });
  }
}
