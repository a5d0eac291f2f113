import type { SheetPageData } from '../contract';
import { createSheetFromTemplate } from '../sheet/templates';

/** Page renders of the invented sheet: the sheet page answered in about 450, 120 and 110 ms before its answers settled near 45 ms. */
const WARM_UP_RENDERS = 4;

/** A sheet nobody owns (a built-in template), shaped as the sheet page hands it to its editor island. */
function inventedPageData(): SheetPageData {
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

const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Runs the sheet page's server work (its first evaluation, the editor island's server render through React's
 * stream renderer, as Astro's React renderer calls it) a few times on a built-in sheet, one step per turn of the
 * event loop so requests that arrive meanwhile are answered between steps. Without it the first people to open a
 * sheet after a start wait for that code to load and compile (the first answer took about ten times a settled one).
 */
export async function warmUpSheetPage(): Promise<void> {
  const [{ evaluateForPage }, { default: SheetEditor }, React, ReactDOMServer] = await Promise.all([
    import('./sheet-page'),
    import('../../components/sheet/SheetEditor'),
    import('react'),
    import('react-dom/server'),
  ]);
  const data = inventedPageData();
  for (let round = 0; round < WARM_UP_RENDERS; round++) {
    await nextTurn();
    const evaluation = evaluateForPage(data.revision.inputs);
    await nextTurn();
    const stream = await ReactDOMServer.renderToReadableStream(React.createElement(SheetEditor, { data, evaluation }));
    await new Response(stream).text();
  }
}
