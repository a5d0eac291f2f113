import { lazy, memo, startTransition, Suspense, useCallback, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import type { WarningCode } from '../../lib/kinematics';
import { formatWhen } from '../../lib/client/api';
import { parseKeepingNonFinite, type SheetLink, type SheetPageData } from '../../lib/contract';
import { setAt, type DocumentPath } from '../../lib/sheet/document-path';
import type { ExportSource } from '../../lib/sheet/run-export';
import { keepGenerators, type WrittenGenerator } from '../../lib/sheet/matrix-edit';
import { displayUnitsOf, type DisplayUnits } from '../../lib/sheet/display-units';
import type { DocumentReadings, FieldReading } from '../../lib/sheet/readings';
import { describeWarning } from '../../lib/sheet/warning-notes';
import DisplayUnitsFields from './DisplayUnitsFields';
import { DocumentStoreContext, SheetFieldsContext, SheetReadingContext, useStore, type DocumentStore, type MarginWarning, type SheetFields, type SheetReading, type Store } from './editor-context';
import { TextField } from './fields';
import HandSection from './HandSection';
import MotionSection from './MotionSection';
import ObjectSection from './ObjectSection';
import PadSection from './PadSection';
import QueryRoot from '../QueryRoot';
import ResultsSection from './ResultsSection';
import ResultsSummary from './ResultsSummary';
import SavePanel from './SavePanel';
import SceneView from './SceneView';
import TitleBlock from './TitleBlock';
import { useCompute, type ComputedSheet } from './useCompute';
import { afterNextPaint, useIdle, whenIdle } from './useIdle';
import type { ComputeReply } from '../../workers/compute-protocol';
import WhenSeen from './WhenSeen';

const RunPanel = lazy(() => import('./RunPanel'));
// KaTeX (derivation, notes), CodeMirror (variables) and Markdown (notes) load when their section nears the screen.
const DerivationSection = lazy(() => import('./DerivationSection'));
const NotesSection = lazy(() => import('./NotesSection'));
const VariablesEditor = lazy(() => import('./VariablesEditor'));
const SweepPanel = lazy(() => import('./SweepPanel'));
const MatrixPanel = lazy(() => import('./MatrixPanel'));

type Solved = ComputedSheet;

/** What the matrix panel needs of the page: the saved revision being edited, whether the caller may write, and the related sheets. */
interface MatrixContext {
  sheet: { id: string; title: string; revision: number; latestRevision: number };
  canEdit: boolean;
  related: SheetLink[];
  /** Appends generators to the sheet's matrix as unsaved edits; absent when the sheet is read only. */
  keep?: (generators: WrittenGenerator[]) => void;
}

/** The 3D view and the run and sweep panels, redrawn after the results table (they follow a copy set once the results are painted); their charts show the sheet's display units. */
const SideViews = memo(function SideViews({ solved, units, matrix, source }: { solved: Solved | null; units: DisplayUnits; matrix: MatrixContext; source: ExportSource }) {
  // The run, sweep and matrix panels (and their charts) load once the page is idle, after the sheet is usable.
  const idle = useIdle();
  const loading = <p className="text-sm text-graphite">Loading runs and sweeps…</p>;
  if (!solved) return <div className="h-80 border-2 border-ink bg-paper-deep" />;
  return (
    <>
      <SceneView document={solved.document} result={solved.result} />
      {idle ? (
        <Suspense fallback={loading}>
          <RunPanel document={solved.document} units={units} source={source} />
          <SweepPanel document={solved.document} units={units} source={source} />
          <MatrixPanel document={solved.document} {...matrix} />
        </Suspense>
      ) : (
        loading
      )}
    </>
  );
});

type RawDocument = Record<string, unknown>;

/** Which section of the pad a warning belongs beside: the inputs that cause it. */
const SECTION_OF: Record<WarningCode, 'object' | 'hand' | 'motion' | 'results'> = {
  CONTACT_LOST: 'object',
  CONTACT_PENETRATING: 'object',
  CONTACT_NEAR_ROLL_AXIS: 'hand',
  CONTACT_NEAR_PIVOT_AXIS: 'hand',
  PIVOT_MISSES_ROLLER_CENTRE: 'hand',
  JOINT_LIMIT_EXCEEDED: 'hand',
  JACOBIAN_NEAR_RANK_LOSS: 'hand',
  TANGENTIAL_SPEED_NEAR_ZERO: 'motion',
  NORMAL_VELOCITY_UNREACHABLE: 'motion',
  RATE_LIMIT_EXCEEDED: 'motion',
  STEER_CANNOT_ALIGN: 'motion',
  SLIP_REQUIRED: 'motion',
  GRASP_RANK_DEFICIENT: 'results',
};

const draftKey = (sheetId: string) => `slipless:sheet-draft:${sheetId}`;

interface Draft {
  baseRevision: number;
  baseDocument: RawDocument;
  document: RawDocument;
  savedAt: string;
}

function readDraft(sheetId: string): Draft | null {
  try {
    const text = window.localStorage.getItem(draftKey(sheetId));
    return text ? (JSON.parse(text) as Draft) : null;
  } catch {
    return null;
  }
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

const NO_VARIABLES: DocumentReadings['variables'] = { text: '', values: [], issues: [] };

/**
 * The field readings of the newest reply, keeping the previous reading object wherever it did not
 * change (and the previous record when none did), so that only the fields whose reading changed re-render.
 */
function useStableReadings(next: Readonly<Record<string, FieldReading>> | undefined): Readonly<Record<string, FieldReading>> {
  const previous = useRef<Readonly<Record<string, FieldReading>>>({});
  return useMemo(() => {
    const kept: Record<string, FieldReading> = {};
    let changed = false;
    for (const [path, reading] of Object.entries(next ?? {})) {
      const before = previous.current[path];
      const same = before && before.text === reading.text && before.kind === reading.kind && Object.is(before.value, reading.value);
      kept[path] = same ? before : reading;
      changed ||= !same;
    }
    if (!changed && Object.keys(kept).length === Object.keys(previous.current).length) return previous.current;
    previous.current = kept;
    return kept;
  }, [next]);
}

/** The issues of the newest reply by path, the previous map while they are the same (fields re-render only when theirs change). */
function useStableIssues(next: readonly { path: string; message: string }[]): ReadonlyMap<string, string> {
  const previous = useRef<ReadonlyMap<string, string>>(new Map());
  return useMemo(() => {
    const issues = new Map(next.map((i) => [i.path, i.message]));
    const same = issues.size === previous.current.size && [...issues].every(([path, message]) => previous.current.get(path) === message);
    if (!same) previous.current = issues;
    return previous.current;
  }, [next]);
}

/**
 * The value once a frame has been painted since it changed, set as a transition: the 3D view, runs and derivation
 * redraw after the results are on screen, never in the frame that shows them (React's own deferred value renders
 * them at once after the results' commit, and one long component there held back that frame).
 */
function usePaintedValue<Value>(value: Value): Value {
  const [painted, setPainted] = useState(value);
  useEffect(() => (painted === value ? undefined : afterNextPaint(() => startTransition(() => setPainted(value)))), [value, painted]);
  return painted;
}

const NO_ISSUES: readonly { path: string; message: string }[] = [];

/** The variables' reading of the newest reply, the previous object while it reads the same: the variables editor then redraws only when its own lines read differently. */
function useStableVariables(next: DocumentReadings['variables']): DocumentReadings['variables'] {
  const previous = useRef(next);
  return useMemo(() => {
    if (JSON.stringify(previous.current) !== JSON.stringify(next)) previous.current = next;
    return previous.current;
  }, [next]);
}

/**
 * The editor's three contexts: what never changes with a keystroke, and two stores (the document, and
 * how the evaluation read it) that sections and fields subscribe to by path, so a keystroke or a
 * result re-renders only what shows a changed value, issue or reading.
 */
function EditorContexts({ fields, document, reading, children }: { fields: SheetFields; document: DocumentStore; reading: Store<SheetReading>; children: ReactNode }) {
  return (
    <SheetFieldsContext.Provider value={fields}>
      <DocumentStoreContext.Provider value={document}>
        <SheetReadingContext.Provider value={reading}>{children}</SheetReadingContext.Provider>
      </DocumentStoreContext.Provider>
    </SheetFieldsContext.Provider>
  );
}

function Editor({ data, evaluation }: { data: SheetPageData; evaluation: string }) {
  const sheetId = data.sheet.id;
  const readOnly = !data.canEdit;
  const initial = data.revision.inputs as RawDocument;
  const [base, setBase] = useState({ revision: data.revision.number, document: initial });
  const [document, setDocument] = useState<RawDocument>(initial);
  // The server's evaluation of the revision as drawn: results before any worker exists.
  const [first] = useState(() => {
    const reply = evaluation ? parseKeepingNonFinite<ComputeReply>(evaluation) : null;
    return reply?.type === 'computed' ? { document: initial, reply } : undefined;
  });
  const [restored, setRestored] = useState<string | null>(null);
  const [latestRevision, setLatestRevision] = useState(data.sheet.latestRevision);

  useEffect(() => {
    if (readOnly) return;
    const draft = readDraft(sheetId);
    if (draft && !same(draft.document, draft.baseDocument)) {
      setBase({ revision: draft.baseRevision, document: draft.baseDocument });
      setDocument(draft.document);
      setRestored(draft.savedAt);
    }
  }, [sheetId, readOnly]);

  const dirty = useMemo(() => !same(document, base.document), [document, base.document]);
  useEffect(() => {
    if (readOnly) return;
    // Written once the page is idle, so a keystroke's own task stays short, and at once if the page is left before that.
    const write = () => {
      if (dirty) {
        const draft: Draft = { baseRevision: base.revision, baseDocument: base.document, document, savedAt: new Date().toISOString() };
        window.localStorage.setItem(draftKey(sheetId), JSON.stringify(draft));
      } else window.localStorage.removeItem(draftKey(sheetId));
    };
    const cancel = whenIdle(write);
    window.addEventListener('pagehide', write);
    return () => {
      cancel();
      window.removeEventListener('pagehide', write);
    };
  }, [document, base, dirty, sheetId, readOnly]);

  const update = useCallback((path: DocumentPath, value: unknown) => {
    performance.mark('slipless:edit');
    setDocument((current) => setAt(current, path, value));
  }, []);

  // The worker derives step by step only once the derivation section has been on screen.
  const [deriving, setDeriving] = useState(false);
  const startDeriving = useCallback(() => setDeriving(true), []);
  const idle = useIdle();
  const { reply, lastGood, pending } = useCompute(document, { derive: deriving, initial: first });
  const deferred = usePaintedValue(lastGood);
  // Run and sweep exports name the sheet, the revision the edits started from, and whether there are unsaved edits.
  const exportTitle = deferred?.document.title ?? data.sheet.title;
  const exportSource: ExportSource = useMemo(
    () => ({ sheetId, title: exportTitle, revision: base.revision, unsaved: dirty }),
    [sheetId, exportTitle, base.revision, dirty],
  );
  useEffect(() => {
    if (!reply || performance.getEntriesByName('slipless:edit', 'mark').length === 0) return;
    performance.measure('slipless:edit-to-result', 'slipless:edit');
    performance.clearMarks('slipless:edit');
  }, [reply]);

  const variablesText = typeof document.variables === 'string' ? document.variables : '';
  const readings = useStableReadings(reply?.readings.fields);
  const variableReadings = useStableVariables(reply?.readings.variables ?? NO_VARIABLES);
  const issues = useStableIssues(reply && !reply.ok ? reply.issues : NO_ISSUES);
  const displayChoice = document.display;
  const units = useMemo(() => displayUnitsOf({ display: displayChoice }), [displayChoice]);
  const matrixContext: MatrixContext = useMemo(
    () => ({
      sheet: { id: sheetId, title: data.sheet.title, revision: base.revision, latestRevision },
      canEdit: data.canEdit,
      related: [...(data.forkedFrom ? [data.forkedFrom] : []), ...data.forks],
      keep: readOnly ? undefined : (generators: WrittenGenerator[]) => setDocument((current) => keepGenerators(current, generators)),
    }),
    [sheetId, data.sheet.title, base.revision, latestRevision, data.canEdit, data.forkedFrom, data.forks, readOnly],
  );
  const fields: SheetFields = useMemo(() => ({ update, units, readOnly }), [update, units, readOnly]);
  const documentStore = useStore(document);
  const readingStore = useStore(useMemo(() => ({ issues, readings }), [issues, readings]));
  const changeVariables = useCallback((text: string) => update(['variables'], text === '' ? undefined : text), [update]);

  const result = lastGood?.result ?? null;
  const margin = useMemo(() => {
    const bySection: Record<string, MarginWarning[]> = { object: [], hand: [], motion: [], results: [] };
    for (const w of result?.warnings ?? []) bySection[SECTION_OF[w.code]].push(describeWarning(w, result?.fingers ?? [], units));
    return bySection;
  }, [result, units]);

  const unlocated = reply && !reply.ok ? reply.issues.filter((i) => i.path === '(document)' || i.path === 'variables') : [];
  const fingerNames = useMemo(() => result?.fingers.map((f) => f.name) ?? [], [result]);

  return (
    <EditorContexts fields={fields} document={documentStore} reading={readingStore}>
      <div className="mx-auto max-w-[100rem] px-4 py-6">
        <TitleBlock
          sheetId={sheetId}
          title={typeof document.title === 'string' ? document.title : data.sheet.title}
          revision={base.revision}
          latestRevision={Math.max(latestRevision, base.revision)}
          author={data.revision.authorName}
          checkedBy={data.checkedBy}
          checkedAt={data.checkedAt}
          date={data.revision.createdAt}
          reviewState={data.sheet.reviewState}
          lastCheckedRevision={data.sheet.lastCheckedRevision}
          forkedFrom={data.forkedFrom}
          forks={data.forks}
          dirty={dirty}
        />
        {restored && (
          <p className="mt-3 border-l-4 border-note pl-3 text-sm" role="status">
            Restored your unsaved changes from {formatWhen(restored)}.{' '}
            <button
              type="button"
              className="underline"
              onClick={() => {
                setDocument(base.document);
                setRestored(null);
              }}
            >
              Discard them
            </button>
          </p>
        )}
        {readOnly && <p className="mt-3 text-sm text-graphite">Read only: your role can view this sheet but not change it.</p>}
        {/*
          The summary comes first in the HTML, so the browser shows results after reading a quarter of the page
          rather than all of it; beside the pad it floats right and, a float being pinned within the whole block
          (a grid item only within its cell), stays in view while the pad scrolls past. The views, runs and sweeps
          come after the pad, so keyboard focus goes summary, pad, views: top to bottom, then left to right.
        */}
        <div className="mt-4 flow-root">
          <aside className="mb-6 xl:sticky xl:top-0 xl:z-20 xl:float-right xl:mb-4 xl:w-[30rem] xl:bg-paper xl:pt-2" aria-label="Results summary">
            <ResultsSummary result={result} document={lastGood?.document ?? null} stale={pending || (reply !== null && !reply.ok)} />
            {lastGood && (
              <p className="mt-2 text-xs text-graphite">
                {/* The first results come with the page (id 0); every later one from the worker. */}
                Solved {lastGood.id === 0 ? 'on the server' : 'in a background worker'} in <span className="num" data-compute-ms>{lastGood.elapsedMs.toFixed(1)}</span> ms.
              </p>
            )}
          </aside>
          <div className="pad-grid min-w-0 border-2 border-ink bg-paper/95 px-5 xl:float-left xl:w-[calc(100%-31.5rem)]" data-pad>
            <PadSection id="sheet-summary" number={0} title="Sheet">
              <div className="grid gap-3 md:grid-cols-2">
                <TextField path={['title']} label="title" />
                <TextField path={['description']} label="description" />
              </div>
              <div className="mt-3">
                <DisplayUnitsFields />
              </div>
            </PadSection>
            <PadSection id="object" number={1} title="Object" warnings={margin.object}>
              <ObjectSection />
            </PadSection>
            <PadSection id="hand" number={2} title="Hand" warnings={margin.hand}>
              <HandSection parsed={lastGood?.document ?? null} />
            </PadSection>
            <PadSection id="motion" number={3} title="Motion" warnings={margin.motion}>
              <MotionSection />
            </PadSection>
            <PadSection id="variables" number={4} title="Variables">
              {/* Also loaded once the page is idle, so the editor is ready by the time anyone scrolls to it. */}
              <WhenSeen early={idle} fallback={<pre className="min-h-[7rem] border border-rule p-2 font-mono text-sm whitespace-pre-wrap">{variablesText}</pre>}>
                <VariablesEditor
                  text={variablesText}
                  reading={variableReadings}
                  readOnly={readOnly}
                  onChange={changeVariables}
                />
              </WhenSeen>
              <p className="mt-1 text-xs text-graphite">
                One <code className="font-mono">name = value</code> per line, e.g. <code className="font-mono">rollerRadius = 14 mm</code>; any field may use the
                names: <code className="font-mono">rollerRadius + 2 mm</code>.
              </p>
            </PadSection>
            <PadSection id="results" number={5} title="Results" warnings={margin.results}>
              {unlocated.length > 0 && (
                <ul role="alert" className="mb-3 border-l-4 border-sienna pl-3 text-sm text-sienna">
                  {unlocated.map((i) => (
                    <li key={i.path + i.message}>{i.path === 'variables' ? `Variables, ${i.message}` : i.message}</li>
                  ))}
                </ul>
              )}
              {reply && !reply.ok && (
                <p className="mb-2 text-xs text-sienna" data-issue-count>
                  {reply.issues.length} problem{reply.issues.length === 1 ? '' : 's'} in the inputs (marked at the fields); the results below are from the last sheet that read cleanly.
                </p>
              )}
              <ResultsSection result={result} units={units} stale={pending || (reply !== null && !reply.ok)} />
            </PadSection>
            <PadSection id="derivation" number={6} title="Derivation">
              <WhenSeen onShow={startDeriving} fallback={<p className="text-sm text-graphite">Waiting for results.</p>}>
                {deferred?.derivation ? (
                  <DerivationSection entries={deferred.derivation} fingerNames={fingerNames} units={units} />
                ) : (
                  <p className="text-sm text-graphite">Waiting for results.</p>
                )}
              </WhenSeen>
            </PadSection>
            <PadSection id="notes" number={7} title="Notes">
              <WhenSeen fallback={<p className="text-sm text-graphite">Loading the notes…</p>}>
                <NotesSection />
              </WhenSeen>
            </PadSection>
            {!readOnly && (
              <div className="sticky bottom-0 z-10 -mx-5 border-t-2 border-ink bg-paper px-5 py-3">
                <SavePanel
                  sheetId={sheetId}
                  baseRevision={base.revision}
                  baseDocument={base.document}
                  document={document}
                  dirty={dirty}
                  readsCleanly={reply?.ok ?? false}
                  forkTargets={data.forkTargets}
                  onSaved={(revision, saved) => {
                    setBase({ revision, document: saved });
                    setLatestRevision((r) => Math.max(r, revision));
                    setRestored(null);
                    window.history.replaceState(null, '', `/sheets/${sheetId}`);
                  }}
                  onReplaceDocument={(theirs, theirRevision, merged) => {
                    setBase({ revision: theirRevision, document: theirs });
                    setLatestRevision((r) => Math.max(r, theirRevision));
                    setDocument(merged);
                  }}
                />
              </div>
            )}
          </div>
          <aside className="mt-6 space-y-4 xl:float-right xl:clear-right xl:mt-0 xl:w-[30rem]" aria-label="Views, runs and sweeps">
            <SideViews solved={deferred} units={units} matrix={matrixContext} source={exportSource} />
          </aside>
        </div>
      </div>
    </EditorContexts>
  );
}

/** The sheet editor island: the pad, live results from a worker, the 3D view, save and fork. */
export default function SheetEditor({ data, evaluation = '' }: { data: SheetPageData; evaluation?: string }) {
  return (
    <QueryRoot>
      <Editor data={data} evaluation={evaluation} />
    </QueryRoot>
  );
}
