import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import ComparisonResultView from './ComparisonResultView';
import LogMappingForm from './LogMappingForm';
import { SafetyCaution } from './SafetyCaution';
import { requestJson } from '../../lib/client/api';
import type { LogComparisonList, LogComparisonRecord, LogUploadDetail, Wire } from '../../lib/contract';
import type { LogComparison } from '../../lib/logs/compare';
import { guessMapping, type MappingDraft } from '../../lib/view/log-mapping-draft';

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

/** The mapping form for one stored log; the server runs the comparison and stores it against the revision. */
function StoredLogComparison({ sheetId, logId, header, jointNames, revision, initial, canRun }: Omit<LogComparisonPanelProps, 'fileName'> & { header: string[]; initial: MappingDraft }) {
  const queryClient = useQueryClient();
  const [latest, setLatest] = useState<Wire<LogComparisonRecord> | null>(null);
  async function compare(mapping: MappingDraft) {
    const record = await requestJson<Wire<LogComparisonRecord>>(`/api/sheets/${sheetId}/logs/${logId}/comparisons`, { method: 'POST', body: { mapping, revision } });
    setLatest(record);
    await queryClient.invalidateQueries({ queryKey: ['log-comparisons', sheetId, logId] });
  }
  return (
    <>
      <LogMappingForm header={header} jointNames={jointNames} initial={initial} canRun={canRun} onCompare={compare} runningText="Streaming the log through the sheet, sample by sample…" />
      {latest && (latest.result ? <ComparisonResultView result={latest.result as LogComparison} revision={latest.revision} /> : <p className="text-sm text-graphite">Status: {latest.status}</p>)}
    </>
  );
}

/** One log's comparison with the sheet: a mapping form from the log's header (prefilled), the verdict, statistics and plots. */
export default function LogComparisonPanel(props: LogComparisonPanelProps) {
  const { sheetId, logId, fileName, jointNames } = props;
  const detail = useQuery({ queryKey: ['log', sheetId, logId], queryFn: () => requestJson<Wire<LogUploadDetail>>(`/api/sheets/${sheetId}/logs/${logId}`) });
  const comparisons = useQuery({
    queryKey: ['log-comparisons', sheetId, logId],
    queryFn: () => requestJson<Wire<LogComparisonList>>(`/api/sheets/${sheetId}/logs/${logId}/comparisons`),
  });
  const header = detail.data?.preview.header;
  const ready = header && comparisons.data;
  return (
    <section aria-label={`Compare ${fileName} with the sheet`} className="mt-3 border-t-2 border-ink pt-3" data-log-comparison>
      <h3 className="font-mono text-xs font-semibold uppercase tracking-[0.2em]">Compare {fileName} with the sheet</h3>
      <SafetyCaution />
      {(detail.isError || comparisons.isError) && <p className="text-sm text-sienna">{(detail.error ?? comparisons.error)?.message}</p>}
      {ready ? (
        <StoredLogComparison
          {...props}
          header={header}
          initial={(comparisons.data.savedMapping as MappingDraft | null) ?? guessMapping(header, jointNames)}
        />
      ) : (
        !detail.isError && !comparisons.isError && <p className="text-xs text-graphite">Reading the log's columns…</p>
      )}
      {comparisons.data && comparisons.data.items.length > 0 && (
        <details className="mt-3 text-xs">
          <summary>Earlier comparisons of this log ({comparisons.data.items.length})</summary>
          <ul>
            {comparisons.data.items.map((item) => (
              <li key={item.id}>
                revision {item.revision} · {item.verdict === 'pass' ? 'within tolerance' : 'outside tolerance'} · {item.createdByName ?? 'Someone'} ·{' '}
                <a className="underline" href={`/api/sheets/${sheetId}/logs/${logId}/comparisons/${item.id}?format=csv`}>
                  statistics CSV
                </a>
              </li>
            ))}
          </ul>
        </details>
      )}
    </section>
  );
}
