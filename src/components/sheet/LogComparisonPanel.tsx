import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import ComparisonResultView from './ComparisonResultView';
import ComparisonSideBySide from './ComparisonSideBySide';
import LogMappingForm from './LogMappingForm';
import { SafetyCaution } from './SafetyCaution';
import { button } from './sheet-styles';
import { formatWhen, requestJson } from '../../lib/client/api';
import type { LogComparisonList, LogComparisonRecord, LogUploadDetail, SheetComparisonList, Wire } from '../../lib/contract';
import type { LogComparison } from '../../lib/logs/compare';
import { guessMapping, type MappingDraft } from '../../lib/view/log-mapping-draft';
import { revisionLabel } from '../../lib/view/revision';

interface LogComparisonPanelProps {
  sheetId: string;
  logId: string;
  fileName: string;
  /** The sheet's joint names, in order, one mapping row each. */
  jointNames: string[];
  /** The revision the page shows, which the comparison judges against. */
  revision: number;
  /** The role may run comparisons ('log.upload'); the server decides either way. */
  canRun: boolean;
}

type StoredComparison = Wire<LogComparisonRecord>;

const verdictText = (verdict: StoredComparison['verdict']) => (verdict === 'pass' ? 'within tolerance' : verdict === 'fail' ? 'outside tolerance' : 'no verdict');
const describe = (item: StoredComparison) => `${revisionLabel(item.revision)} · ${formatWhen(item.createdAt)}`;

/**
 * The log's comparisons, newest first: each can be shown, downloaded (statistics or per-sample
 * CSV), re-run on the sheet's latest revision when it judged an older one, and picked for a
 * side-by-side view of two.
 */
function ComparisonList({ sheetId, logId, items, latestRevision, canRun, shown, onShow, onRerun }: {
  sheetId: string;
  logId: string;
  items: StoredComparison[];
  latestRevision: number | null;
  canRun: boolean;
  shown: string | null;
  onShow: (id: string) => void;
  onRerun: (item: StoredComparison, revision: number) => Promise<void>;
}) {
  const [picked, setPicked] = useState<string[]>([]);
  const [rerunning, setRerunning] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const pick = (id: string, on: boolean) => setPicked((now) => (on ? [...now.filter((p) => p !== id), id].slice(-2) : now.filter((p) => p !== id)));
  // Older on the left, so "better" and "worse" read as the change from the earlier comparison.
  const pair = items.filter((item) => picked.includes(item.id) && item.result).reverse();
  async function rerun(item: StoredComparison, revision: number) {
    setRerunning(item.id);
    setError(null);
    try {
      await onRerun(item, revision);
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
    } finally {
      setRerunning(null);
    }
  }
  const base = `/api/sheets/${sheetId}/logs/${logId}/comparisons`;
  return (
    <section aria-label="Comparisons of this log" className="mt-3 text-xs" data-comparison-list>
      <h4 className="font-mono text-xs font-semibold uppercase tracking-[0.2em]">Comparisons of this log ({items.length})</h4>
      <div className="overflow-x-auto">
        <table className="w-full text-left">
          <thead>
            <tr><th>Side by side</th><th>Revision</th><th>Verdict</th><th>By</th><th>When</th><th>Export</th><th /></tr>
          </thead>
          <tbody>
            {items.map((item) => (
              <tr key={item.id} className={item.id === shown ? 'bg-paper-deep' : ''} data-comparison-item={item.id} data-revision={item.revision}>
                <td>
                  <input type="checkbox" aria-label={`Pick ${describe(item)} for side by side`} checked={picked.includes(item.id)} disabled={!item.result} onChange={(e) => pick(item.id, e.target.checked)} data-pick-comparison />
                </td>
                <td className="num">{item.revision}</td>
                <td className={item.verdict === 'fail' ? 'text-sienna' : ''}>{verdictText(item.verdict)}</td>
                <td>{item.createdByName ?? 'Someone'}</td>
                <td>{formatWhen(item.createdAt)}</td>
                <td className="space-x-2">
                  <a className="underline" href={`${base}/${item.id}?format=csv`}>statistics CSV</a>
                  <a className="underline" href={`${base}/${item.id}?format=series`} data-series-csv>per-sample CSV</a>
                </td>
                <td className="space-x-2 whitespace-nowrap">
                  {item.result && item.id !== shown && (
                    <button type="button" className="underline" onClick={() => onShow(item.id)} data-show-comparison>Show</button>
                  )}
                  {canRun && latestRevision !== null && item.revision < latestRevision && (
                    <button type="button" className={button} disabled={rerunning !== null} onClick={() => rerun(item, latestRevision)} data-rerun>
                      {rerunning === item.id ? 'Re-running…' : `Re-run on ${revisionLabel(latestRevision)}`}
                    </button>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {error && <p role="alert" className="text-sm text-sienna">{error}</p>}
      {pair.length === 2 ? (
        <ComparisonSideBySide
          left={{ revision: pair[0]!.revision, result: pair[0]!.result as LogComparison, label: describe(pair[0]!) }}
          right={{ revision: pair[1]!.revision, result: pair[1]!.result as LogComparison, label: describe(pair[1]!) }}
        />
      ) : (
        items.length > 1 && <p className="mt-1 text-graphite">Tick two comparisons to see them side by side.</p>
      )}
    </section>
  );
}

/** One log's comparison with the sheet: a mapping form from the log's header (prefilled), the log's comparisons, the verdict, statistics and plots of the one shown. */
export default function LogComparisonPanel(props: LogComparisonPanelProps) {
  const { sheetId, logId, fileName, jointNames, revision, canRun } = props;
  const queryClient = useQueryClient();
  const [shown, setShown] = useState<string | null>(null);
  const detail = useQuery({ queryKey: ['log', sheetId, logId], queryFn: () => requestJson<Wire<LogUploadDetail>>(`/api/sheets/${sheetId}/logs/${logId}`) });
  const comparisons = useQuery({
    queryKey: ['log-comparisons', sheetId, logId],
    queryFn: () => requestJson<Wire<LogComparisonList>>(`/api/sheets/${sheetId}/logs/${logId}/comparisons`),
  });
  const sheetComparisons = useQuery({
    queryKey: ['sheet-comparisons', sheetId],
    queryFn: () => requestJson<Wire<SheetComparisonList>>(`/api/sheets/${sheetId}/comparisons`),
  });
  async function run(mapping: unknown, atRevision: number) {
    const record = await requestJson<StoredComparison>(`/api/sheets/${sheetId}/logs/${logId}/comparisons`, { method: 'POST', body: { mapping, revision: atRevision } });
    setShown(record.id);
    await Promise.all([
      queryClient.invalidateQueries({ queryKey: ['log-comparisons', sheetId, logId] }),
      queryClient.invalidateQueries({ queryKey: ['sheet-comparisons', sheetId] }),
    ]);
  }
  const header = detail.data?.preview.header;
  const items = comparisons.data?.items ?? [];
  const current = items.find((item) => item.id === shown) ?? null;
  const failure = detail.error ?? comparisons.error ?? sheetComparisons.error;
  return (
    <section aria-label={`Compare ${fileName} with the sheet`} className="mt-3 border-t-2 border-ink pt-3" data-log-comparison>
      <h3 className="font-mono text-xs font-semibold uppercase tracking-[0.2em]">Compare {fileName} with the sheet</h3>
      <SafetyCaution />
      {failure && <p className="text-sm text-sienna">{failure.message}</p>}
      {header && comparisons.data ? (
        <LogMappingForm
          header={header}
          jointNames={jointNames}
          initial={(comparisons.data.savedMapping as MappingDraft | null) ?? guessMapping(header, jointNames)}
          canRun={canRun}
          onCompare={(mapping: MappingDraft) => run(mapping, revision)}
          runningText="Streaming the log through the sheet, sample by sample…"
        />
      ) : (
        !failure && <p className="text-xs text-graphite">Reading the log's columns…</p>
      )}
      {items.length > 0 && (
        <ComparisonList
          sheetId={sheetId}
          logId={logId}
          items={items}
          latestRevision={sheetComparisons.data?.latestRevision ?? null}
          canRun={canRun}
          shown={current?.id ?? null}
          onShow={setShown}
          onRerun={(item, latest) => run(item.mapping, latest)}
        />
      )}
      {current && (current.result ? <ComparisonResultView result={current.result as LogComparison} revision={current.revision} /> : <p className="text-sm text-graphite">Status: {current.status}</p>)}
    </section>
  );
}
