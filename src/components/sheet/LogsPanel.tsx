import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useRef, useState, type ChangeEvent } from 'react';
import QueryRoot from '../QueryRoot';
import { ApiError, formatWhen, requestJson, uploadFile, type Upload } from '../../lib/client/api';
import type { LogUploadSummary, Wire } from '../../lib/contract';
import { MAX_LOG_BYTES } from '../../lib/validation/log-uploads';
import { formatBytes } from '../../lib/view/bytes';
import LocalLogCheck from './LocalLogCheck';
import LogComparisonPanel from './LogComparisonPanel';
import { button } from './sheet-styles';

interface LogsPanelProps {
  sheetId: string;
  /** The role may upload and delete logs ('log.upload'); the server decides either way. */
  canUpload: boolean;
  /** The sheet's joint names, in order, for the comparison's mapping form. */
  jointNames: string[];
  /** The revision the page shows; comparisons judge the log against it. */
  revision: number;
}

function Logs({ sheetId, canUpload, jointNames, revision }: LogsPanelProps) {
  const queryClient = useQueryClient();
  const input = useRef<HTMLInputElement>(null);
  const running = useRef<Upload<Wire<LogUploadSummary>> | null>(null);
  const [progress, setProgress] = useState<{ fileName: string; sent: number; total: number } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [comparing, setComparing] = useState<string | null>(null);
  const logs = useQuery({ queryKey: ['logs', sheetId], queryFn: () => requestJson<{ items: Wire<LogUploadSummary>[] }>(`/api/sheets/${sheetId}/logs`) });
  const remove = useMutation({
    mutationFn: (logId: string) => requestJson(`/api/sheets/${sheetId}/logs/${logId}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['logs', sheetId] }),
    onError: (e: Error) => setError(e.message),
  });

  async function start(event: ChangeEvent<HTMLInputElement>) {
    const file = event.target.files?.[0];
    event.target.value = '';
    if (!file) return;
    setError(null);
    // The server enforces the limit too; checking here spares sending 500 MiB to hear it.
    if (file.size > MAX_LOG_BYTES) {
      setError(`${file.name} is ${formatBytes(file.size)}; a log may be at most ${formatBytes(MAX_LOG_BYTES)}.`);
      return;
    }
    setProgress({ fileName: file.name, sent: 0, total: file.size });
    const upload = uploadFile<Wire<LogUploadSummary>>(`/api/sheets/${sheetId}/logs?fileName=${encodeURIComponent(file.name)}`, file, (sent, total) =>
      setProgress({ fileName: file.name, sent, total }),
    );
    running.current = upload;
    try {
      await upload.done;
      await queryClient.invalidateQueries({ queryKey: ['logs', sheetId] });
    } catch (e) {
      setError(e instanceof ApiError ? e.message : String(e));
    } finally {
      running.current = null;
      setProgress(null);
    }
  }

  const items = logs.data?.items ?? [];
  return (
    <section aria-label="Controller logs" className="mt-6 border-2 border-ink bg-paper p-5" data-logs-panel>
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="font-mono text-sm font-semibold uppercase tracking-[0.2em]">Controller logs</h2>
        <p className="text-xs text-graphite">CSV or gzip-compressed CSV, up to {formatBytes(MAX_LOG_BYTES)}</p>
      </header>
      <ul className="mt-3 divide-y divide-rule text-sm">
        {items.map((log) => (
          <li key={log.id} className="flex flex-wrap items-baseline gap-x-3 py-1.5" data-log>
            <span className="font-mono">{log.fileName}</span>
            <span className="num text-graphite">{formatBytes(log.byteSize)}</span>
            {log.contentType === 'application/gzip' && <span className="text-xs text-graphite">gzip</span>}
            <span className="text-xs text-graphite">
              {log.uploaderName ?? 'Someone'} · {formatWhen(log.createdAt)}
            </span>
            <button type="button" className="ml-auto text-xs underline" aria-expanded={comparing === log.id} onClick={() => setComparing(comparing === log.id ? null : log.id)} data-compare-log>
              {comparing === log.id ? 'Close comparison' : 'Compare with the sheet'}
            </button>
            {canUpload && (
              <button type="button" className="text-xs underline disabled:opacity-60" disabled={remove.isPending} onClick={() => remove.mutate(log.id)}>
                Delete
              </button>
            )}
            {comparing === log.id && (
              <div className="min-w-0 basis-full">
                <LogComparisonPanel sheetId={sheetId} logId={log.id} fileName={log.fileName} jointNames={jointNames} revision={revision} canRun={canUpload} />
              </div>
            )}
          </li>
        ))}
        {logs.data && items.length === 0 && <li className="py-1.5 text-graphite">No logs uploaded yet.</li>}
        {logs.isError && <li className="py-1.5 text-sienna">{logs.error.message}</li>}
      </ul>
      {progress && (
        <div className="mt-3 space-y-1" data-upload-progress>
          <label className="block text-xs text-graphite">
            Uploading {progress.fileName}: {formatBytes(progress.sent)} of {formatBytes(progress.total)}
            <progress className="mt-1 block h-2 w-full accent-verdigris" max={progress.total || 1} value={progress.sent} />
          </label>
          <button type="button" className={button} onClick={() => running.current?.abort()}>
            Stop upload
          </button>
        </div>
      )}
      {error && (
        <p role="alert" className="mt-2 text-sm text-sienna">
          {error}
        </p>
      )}
      {canUpload && !progress && (
        <div className="mt-3">
          <input ref={input} type="file" accept=".csv,.gz,text/csv,application/gzip" className="sr-only" aria-label="Controller log file" onChange={start} data-log-input />
          <button type="button" className={button} onClick={() => input.current?.click()}>
            Upload a log
          </button>
        </div>
      )}
      <LocalLogCheck sheetId={sheetId} jointNames={jointNames} revision={revision} />
    </section>
  );
}

/** The sheet's controller logs: upload with a progress bar, list with size and date, delete; and a check of a local log in this browser. */
export default function LogsPanel(props: LogsPanelProps) {
  return (
    <QueryRoot>
      <Logs {...props} />
    </QueryRoot>
  );
}
