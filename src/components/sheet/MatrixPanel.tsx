import { useEffect, useState } from 'react';
import { ApiError, requestJson } from '../../lib/client/api';
import type { WrittenGenerator } from '../../lib/sheet/matrix-edit';
import type { MatrixResultRecord, SheetLink, Wire } from '../../lib/contract';
import type { MatrixGroup, MatrixResult, Spread } from '../../lib/sheet/matrix';
import type { MatrixGenerator, MatrixSettings, SheetDocument } from '../../lib/sheet/types';
import { revisionLabel } from '../../lib/view/revision';
import { inputClass, labelClass, primaryButton, secondaryButton } from '../form-parts';
import JobProgress from './JobProgress';
import { MATRIX_JOBS, useWorkerJob } from './useWorkerJob';

/** Most generated targets one browser run adds, as the sheet format allows in a matrix. */
const MAX_GENERATED = 500;
const EMPTY_MATRIX: MatrixSettings = { targets: [], starts: [], generators: [], metric: 'phi6' };

const number = (value: number | null, digits = 4) => (value === null ? '—' : Number(value.toPrecision(digits)).toString());
const meanSd = (s: Spread, digits = 4) => (s.mean === null ? '—' : s.sd === null ? number(s.mean, digits) : `${number(s.mean, digits)} ± ${number(s.sd, 2)}`);

/** Where a revision's stored matrix lives: this sheet, or a fork or parent at one of its revisions. */
interface Side {
  sheetId: string;
  revision: number;
  title: string;
}

function GroupTable({ groups, unit, testId }: { groups: readonly MatrixGroup[]; unit: string; testId: string }) {
  return (
    <table className="w-full text-left text-xs" data-testid={testId}>
      <thead>
        <tr className="border-b-2 border-ink">
          <th className="py-1 pr-2">Group</th>
          <th className="pr-2">Converged</th>
          <th className="pr-2">Final error ({unit}), mean ± sd</th>
          <th className="pr-2">Ticks to converge</th>
          <th>Time to converge (s)</th>
        </tr>
      </thead>
      <tbody>
        {groups.map((g) => (
          <tr key={g.group} className="border-b border-rule">
            <td className="py-1 pr-2">{g.group}</td>
            <td className="num pr-2">{g.converged} / {g.runs}</td>
            <td className="num pr-2">{meanSd(g.finalError)}</td>
            <td className="num pr-2">{meanSd(g.ticks)}</td>
            <td className="num">{meanSd(g.time)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function MatrixResults({ result, elapsedMs }: { result: Wire<MatrixResult> | MatrixResult; elapsedMs: number }) {
  const unit = result.metricUnit === 'rad' ? 'rad' : '1';
  return (
    <div className="space-y-3" data-testid="matrix-results">
      <p className="text-xs text-graphite" role="status">
        <span className="num">{result.runs.length}</span> of <span className="num">{result.totalRuns}</span> runs in{' '}
        <span className="num">{(elapsedMs / 1000).toFixed(1)} s</span>
        {result.complete ? '' : ' (stopped before the end)'}; final error by {result.metric}, converged at or below{' '}
        <span className="num">{number(result.threshold)}</span> {unit}.
      </p>
      <GroupTable groups={result.groups} unit={unit} testId="matrix-groups" />
      <div className="max-h-96 overflow-auto">
        <table className="w-full text-left text-xs" data-testid="matrix-runs">
          <thead>
            <tr className="border-b-2 border-ink">
              <th className="py-1 pr-2">#</th>
              <th className="pr-2">Group</th>
              <th className="pr-2">Start</th>
              <th className="pr-2">Target (w, x, y, z)</th>
              <th className="pr-2">Outcome</th>
              <th className="pr-2">Final error ({unit})</th>
              <th className="pr-2">Ticks</th>
              <th className="pr-2">Time (s)</th>
              <th>Warnings hit</th>
            </tr>
          </thead>
          <tbody>
            {result.runs.map((r) => (
              <tr key={r.index} className="border-b border-rule align-top">
                <td className="num py-1 pr-2">{r.index + 1}</td>
                <td className="pr-2">{r.group}</td>
                <td className="pr-2">{r.startLabel}</td>
                <td className="num pr-2">{[r.targetOrientation.w, r.targetOrientation.x, r.targetOrientation.y, r.targetOrientation.z].map((v) => v.toFixed(3)).join(', ')}</td>
                <td className={`pr-2 ${r.outcome === 'converged' ? '' : 'font-semibold text-sienna'}`}>{r.outcome}</td>
                <td className="num pr-2">{number(r.finalError)}</td>
                <td className="num pr-2">{r.ticks}</td>
                <td className="num pr-2">{number(r.time)}</td>
                <td className="text-[11px]">{r.warnings.join(' ') || 'none'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** Two stored matrices side by side, group by group (groups of either side, in order of first appearance). */
function MatrixComparison({ left, right }: { left: { label: string; record: Wire<MatrixResultRecord> }; right: { label: string; record: Wire<MatrixResultRecord> } }) {
  const groups = [...new Set([...left.record.result.groups, ...right.record.result.groups].map((g) => g.group))];
  const find = (record: Wire<MatrixResultRecord>, group: string) => record.result.groups.find((g) => g.group === group);
  const cell = (g: MatrixGroup | undefined) => (g ? `${g.converged}/${g.runs} converged · ${meanSd(g.finalError)}` : 'not in this matrix');
  return (
    <table className="w-full text-left text-xs" data-testid="matrix-comparison">
      <thead>
        <tr className="border-b-2 border-ink">
          <th className="py-1 pr-2">Group</th>
          <th className="pr-2">{left.label}</th>
          <th>{right.label}</th>
        </tr>
      </thead>
      <tbody>
        {groups.map((group) => (
          <tr key={group} className="border-b border-rule">
            <td className="py-1 pr-2">{group}</td>
            <td className="num pr-2">{cell(find(left.record, group))}</td>
            <td className="num">{cell(find(right.record, group))}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

const matrixUrl = (side: Side) => `/api/sheets/${side.sheetId}/revisions/${side.revision}/matrix`;

/** The stored matrix of a side, or null when it has none yet. */
async function storedMatrix(side: Side): Promise<Wire<MatrixResultRecord> | null> {
  try {
    return await requestJson<Wire<MatrixResultRecord>>(matrixUrl(side));
  } catch (error) {
    if (error instanceof ApiError && error.status === 404) return null;
    throw error;
  }
}

/**
 * The sheet's test matrix: runs it (with any targets generated here) in a worker with progress and
 * cancel, shows every run and each group's mean and standard deviation; stores the saved revision's
 * matrix on the server and compares it with another revision's, or a fork's or parent's.
 */
export default function MatrixPanel({
  document,
  sheet,
  canEdit,
  related,
  keep,
}: {
  document: SheetDocument;
  sheet: { id: string; title: string; revision: number; latestRevision: number };
  canEdit: boolean;
  /** The sheet this one was forked from and its forks, at their revisions. */
  related: SheetLink[];
  /** Appends generators to the sheet's matrix as unsaved edits; absent when the sheet is read only. */
  keep?: (generators: WrittenGenerator[]) => void;
}) {
  const hasMatrix = document.matrix !== undefined;
  const [spread, setSpread] = useState({ count: hasMatrix ? '0' : '8', angle: '60' });
  const [random, setRandom] = useState({ count: hasMatrix ? '0' : '8', seed: '1' });
  const [error, setError] = useState<string | null>(null);
  const { state, start, cancel } = useWorkerJob(MATRIX_JOBS);
  const here: Side = { sheetId: sheet.id, revision: sheet.revision, title: sheet.title };
  const [stored, setStored] = useState<Wire<MatrixResultRecord> | null>(null);
  const [serverState, setServerState] = useState<{ busy: boolean; message: string | null }>({ busy: false, message: null });
  const others: Side[] = [
    ...Array.from({ length: sheet.latestRevision }, (_, i) => ({ sheetId: sheet.id, revision: i + 1, title: sheet.title })).filter((s) => s.revision !== sheet.revision),
    ...related.map((link) => ({ sheetId: link.id, revision: link.revision, title: link.title })),
  ];
  const [otherKey, setOtherKey] = useState('');
  const [compared, setCompared] = useState<{ side: Side; record: Wire<MatrixResultRecord> | null } | null>(null);

  useEffect(() => {
    storedMatrix({ sheetId: sheet.id, revision: sheet.revision, title: sheet.title }).then(setStored, (e: unknown) =>
      setServerState({ busy: false, message: e instanceof Error ? e.message : String(e) }),
    );
  }, [sheet.id, sheet.revision, sheet.title]);

  function generators(): MatrixGenerator[] | string {
    const out: MatrixGenerator[] = [];
    const spreadCount = Number(spread.count), angle = Number(spread.angle), randomCount = Number(random.count), seed = Number(random.seed);
    if (![spreadCount, randomCount].every((n) => Number.isInteger(n) && n >= 0 && n <= MAX_GENERATED)) return `Counts must be whole numbers from 0 to ${MAX_GENERATED}.`;
    if (spreadCount > 0) {
      if (!Number.isFinite(angle) || spread.angle.trim() === '') return 'Give the turn angle of the spread axes in degrees.';
      out.push({ kind: 'spread-axes', count: spreadCount, angle: (angle * Math.PI) / 180 });
    }
    if (randomCount > 0) {
      if (!Number.isInteger(seed)) return 'The seed must be a whole number.';
      out.push({ kind: 'random', count: randomCount, seed });
    }
    return out;
  }

  function run() {
    const extra = generators();
    if (typeof extra === 'string') return setError(extra);
    const base = document.matrix ?? EMPTY_MATRIX;
    const settings = { ...base, generators: [...base.generators, ...extra] };
    const total = settings.targets.length + settings.generators.reduce((sum, g) => sum + g.count, 0);
    if (total === 0) return setError('The matrix has no targets: generate some above.');
    if (total > MAX_GENERATED) return setError(`${total} targets; a matrix has at most ${MAX_GENERATED}.`);
    setError(null);
    start({ kind: 'matrix', document, settings });
  }

  /** Moves the generators set here into the sheet (the spread angle written in degrees, as typed) and clears them here, so the next run does not count them twice. */
  function keepInSheet() {
    const extra = generators();
    if (typeof extra === 'string') return setError(extra);
    if (extra.length === 0) return setError('Set a count above to keep generated targets in the sheet.');
    setError(null);
    keep?.(extra.map((g): WrittenGenerator => (g.kind === 'spread-axes' ? { ...g, angle: `${Number(spread.angle)} deg` } : g)));
    setSpread({ ...spread, count: '0' });
    setRandom({ ...random, count: '0' });
  }

  async function computeOnServer() {
    setServerState({ busy: true, message: null });
    try {
      setStored(await requestJson<Wire<MatrixResultRecord>>(matrixUrl(here), { method: 'POST' }));
      setServerState({ busy: false, message: null });
    } catch (e) {
      setServerState({ busy: false, message: e instanceof Error ? e.message : String(e) });
    }
  }

  async function compare(key: string) {
    setOtherKey(key);
    const side = others.find((s) => `${s.sheetId}:${s.revision}` === key);
    if (!side) return setCompared(null);
    try {
      setCompared({ side, record: await storedMatrix(side) });
    } catch (e) {
      setServerState({ busy: false, message: e instanceof Error ? e.message : String(e) });
    }
  }

  const label = (side: Side) => (side.sheetId === sheet.id ? revisionLabel(side.revision) : `${side.title}, ${revisionLabel(side.revision)}`);

  return (
    <section className="@container space-y-4 border-2 border-ink bg-paper p-3" aria-label="Test matrix" data-testid="matrix-panel">
      <h3 className="text-sm font-semibold">Test matrix</h3>
      <p className="text-xs text-graphite">
        {hasMatrix
          ? `The sheet's matrix: ${document.matrix!.targets.length} listed targets, ${document.matrix!.generators.reduce((n, g) => n + g.count, 0)} generated, from ${Math.max(1, document.matrix!.starts.length)} start pose(s). Targets generated here are added for this run only, unless kept in the sheet.`
          : 'This sheet has no test matrix; targets generated here run in this browser only, unless kept in the sheet (saved with the next revision).'}
      </p>
      <form
        onSubmit={(event) => {
          event.preventDefault();
          run();
        }}
        noValidate
        className="grid grid-cols-2 items-end gap-3 @2xl:grid-cols-[1fr_1fr_1fr_1fr_auto]">
        <label className={labelClass}>
          Spread axes (count)
          <input className={inputClass} name="matrixSpreadCount" inputMode="numeric" value={spread.count} onChange={(e) => setSpread({ ...spread, count: e.target.value })} />
        </label>
        <label className={labelClass}>
          Turn about each (deg)
          <input className={inputClass} name="matrixSpreadAngle" inputMode="decimal" value={spread.angle} onChange={(e) => setSpread({ ...spread, angle: e.target.value })} />
        </label>
        <label className={labelClass}>
          Random rotations (count)
          <input className={inputClass} name="matrixRandomCount" inputMode="numeric" value={random.count} onChange={(e) => setRandom({ ...random, count: e.target.value })} />
        </label>
        <label className={labelClass}>
          Seed
          <input className={inputClass} name="matrixSeed" inputMode="numeric" value={random.seed} onChange={(e) => setRandom({ ...random, seed: e.target.value })} />
        </label>
        <button className={`${primaryButton} col-span-2 @2xl:col-span-1`} disabled={state.status === 'running'}>
          Run matrix
        </button>
      </form>
      {keep && (
        <button type="button" className={secondaryButton} onClick={keepInSheet} title="Adds the generators set above to the sheet's test matrix (saved with the next revision)">
          Keep in the sheet
        </button>
      )}
      {error && (
        <p className="border-l-4 border-sienna pl-3 text-sm text-sienna" role="alert">
          {error}
        </p>
      )}
      <JobProgress state={state} unit="runs" onCancel={cancel} />
      {state.status === 'done' && <MatrixResults result={state.result.result} elapsedMs={state.result.elapsedMs} />}

      <div className="space-y-2 border-t-2 border-rule pt-3" data-testid="matrix-stored">
        <h4 className="text-sm font-semibold">Stored with {revisionLabel(sheet.revision)}</h4>
        {stored ? (
          <>
            <p className="text-xs text-graphite">
              Computed on the server by {stored.createdByName ?? 'a former member'}: {stored.result.runs.length} of {stored.result.totalRuns} runs.
            </p>
            <GroupTable groups={stored.result.groups} unit={stored.result.metricUnit} testId="matrix-stored-groups" />
          </>
        ) : (
          <p className="text-xs text-graphite">No stored matrix for this revision yet.</p>
        )}
        {canEdit && hasMatrix && (
          <button type="button" className={secondaryButton} disabled={serverState.busy} onClick={computeOnServer} title="Runs the saved revision's matrix on the server (unsaved edits are not included)">
            {serverState.busy ? 'Computing…' : `Compute and store for ${revisionLabel(sheet.revision)}`}
          </button>
        )}
        {serverState.message && (
          <p className="border-l-4 border-sienna pl-3 text-sm text-sienna" role="alert">
            {serverState.message}
          </p>
        )}
        {others.length > 0 && (
          <label className={labelClass}>
            Compare with
            <select className={inputClass} name="matrixCompare" value={otherKey} onChange={(e) => void compare(e.target.value)}>
              <option value="">—</option>
              {others.map((side) => (
                <option key={`${side.sheetId}:${side.revision}`} value={`${side.sheetId}:${side.revision}`}>
                  {label(side)}
                </option>
              ))}
            </select>
          </label>
        )}
        {compared &&
          (compared.record && stored ? (
            <MatrixComparison left={{ label: label(here), record: stored }} right={{ label: label(compared.side), record: compared.record }} />
          ) : (
            <p className="text-xs text-graphite">{compared.record ? `${label(here)} has no stored matrix to compare.` : `${label(compared.side)} has no stored matrix.`}</p>
          ))}
      </div>
    </section>
  );
}
