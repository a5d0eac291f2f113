import { useQuery } from '@tanstack/react-query';
import { useRef, useState, type ChangeEvent } from 'react';
import ComparisonResultView from './ComparisonResultView';
import JobProgress from './JobProgress';
import LogMappingForm from './LogMappingForm';
import { SafetyCaution } from './SafetyCaution';
import { button } from './sheet-styles';
import { LOG_COMPARE_JOBS, useWorkerJob } from './useWorkerJob';
import { requestJson } from '../../lib/client/api';
import type { SheetRevisionDetail, Wire } from '../../lib/contract';
import { readLogHeader } from '../../lib/logs/log-file';
import { formatBytes } from '../../lib/view/bytes';
import { guessMapping, type MappingDraft } from '../../lib/view/log-mapping-draft';
import { revisionLabel } from '../../lib/view/revision';

interface LocalLogCheckProps {
  sheetId: string;
  /** The sheet's joint names, in order, one mapping row each. */
  jointNames: string[];
  /** The revision the page shows, which the check judges against. */
  revision: number;
}

/**
 * A log file on this computer compared with the sheet in a worker in this browser: the file is
 * read where it lies, nothing is uploaded or stored, so any reader of the sheet may check one.
 * The comparison is the same one the server runs for stored logs.
 */
export default function LocalLogCheck({ sheetId, jointNames, revision }: LocalLogCheckProps) {
  const input = useRef<HTMLInputElement>(null);
  const [picked, setPicked] = useState<{ file: File; header: string[] } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const { state, start, cancel } = useWorkerJob(LOG_COMPARE_JOBS);
  const sheet = useQuery({
    queryKey: ['sheet-revision', sheetId, revision],
    queryFn: () => requestJson<Wire<SheetRevisionDetail>>(`/api/sheets/${sheetId}?revision=${revision}`),
    enabled: picked !== null,
  });

  async function pick(event: ChangeEvent<HTMLInputElement>) {
    const file = event.target.files?.[0];
    event.target.value = '';
    if (!file) return;
    setError(null);
    setPicked(null);
    try {
      const header = await readLogHeader(file);
      if (header.length === 0) setError(`${file.name} is empty: a log starts with a header line naming its columns.`);
      else setPicked({ file, header });
    } catch {
      setError(`${file.name} could not be read (a damaged gzip file?).`);
    }
  }

  async function compare(mapping: MappingDraft) {
    if (!picked || !sheet.data) throw new Error('The sheet revision is still loading.');
    const final = await start({ type: 'compare-log', document: sheet.data.revision.inputs, mapping, file: picked.file });
    if (final.status === 'failed') throw Object.assign(new Error(final.message), { issues: (final.issues ?? []).map((message) => ({ message })) });
  }

  return (
    <section aria-label="Check a local log in this browser" className="mt-4 border-t-2 border-ink pt-3" data-local-log-check>
      <h3 className="font-mono text-xs font-semibold uppercase tracking-[0.2em]">Check a local log in this browser</h3>
      <p className="mt-1 text-xs text-graphite">
        The file is read and compared here, in this browser, against {revisionLabel(revision)}: nothing is uploaded or stored. CSV or gzip-compressed CSV, any size.
      </p>
      <div className="mt-2 flex flex-wrap items-baseline gap-3">
        <input ref={input} type="file" accept=".csv,.gz,text/csv,application/gzip" className="sr-only" aria-label="Local log file" onChange={pick} data-local-log-input />
        <button type="button" className={button} onClick={() => input.current?.click()} disabled={state.status === 'running'}>
          {picked ? 'Choose another log file' : 'Choose a log file'}
        </button>
        {picked && (
          <span className="text-xs">
            <span className="font-mono">{picked.file.name}</span> <span className="num text-graphite">{formatBytes(picked.file.size)}</span>
          </span>
        )}
      </div>
      {error && (
        <p role="alert" className="mt-2 text-sm text-sienna">
          {error}
        </p>
      )}
      {picked && (
        <>
          <SafetyCaution />
          {sheet.isError && <p className="text-sm text-sienna">{sheet.error.message}</p>}
          <LogMappingForm
            key={`${picked.file.name}:${picked.file.lastModified}:${picked.header.join(',')}`}
            header={picked.header}
            jointNames={jointNames}
            initial={guessMapping(picked.header, jointNames)}
            canRun={sheet.isSuccess}
            onCompare={compare}
            runningText="Reading the log in this browser and comparing it with the sheet, sample by sample…"
          />
          <div className="mt-2">
            <JobProgress state={state.status === 'failed' ? { status: 'idle' } : state} unit="bytes" onCancel={cancel} />
          </div>
          {state.status === 'done' && (
            <>
              <p className="num mt-2 text-xs text-graphite" data-local-check-detail data-progress-messages={state.result.progressMessages}>
                {state.detail}
              </p>
              <ComparisonResultView result={state.result.comparison} revision={revision} />
            </>
          )}
        </>
      )}
    </section>
  );
}
