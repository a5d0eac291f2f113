import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRef, useState, type FormEvent } from 'react';
import { FormError, inputClass, labelClass, primaryButton, secondaryButton } from '../form-parts';

/** A located problem in the file as POST /api/sheets/import reports it. */
interface FileIssue {
  message: string;
  path?: string;
  line?: number;
  column?: number;
}

class ImportError extends Error {
  constructor(
    message: string,
    readonly issues: FileIssue[],
    readonly text: string,
  ) {
    super(message);
  }
}

interface Imported {
  sheetId: string;
  title: string;
}

async function importFile(teamId: string, file: File, title: string): Promise<Imported> {
  const content = await file.text();
  const response = await fetch('/api/sheets/import', {
    method: 'POST',
    credentials: 'same-origin',
    headers: { accept: 'application/json', 'content-type': 'application/json' },
    body: JSON.stringify({ teamId, fileName: file.name, content, ...(title.trim() ? { title: title.trim() } : {}) }),
  });
  const body = await response.json().catch(() => null);
  if (!response.ok) {
    const error = body?.error as { message?: string; issues?: FileIssue[] } | undefined;
    throw new ImportError(error?.message ?? `The server answered ${response.status}.`, error?.issues ?? [], content);
  }
  return { sheetId: body.sheetId, title: title.trim() || file.name };
}

/** The lines around a located issue, with a caret under the column, as an editor would show them. */
function Excerpt({ text, line, column }: { text: string; line: number; column?: number }) {
  const lines = text.split('\n');
  const first = Math.max(1, line - 1);
  const last = Math.min(lines.length, line + 1);
  const width = String(last).length;
  const shown: string[] = [];
  for (let n = first; n <= last; n++) {
    shown.push(`${String(n).padStart(width)} │ ${lines[n - 1] ?? ''}`);
    if (n === line && column) shown.push(`${' '.repeat(width)} │ ${' '.repeat(column - 1)}^`);
  }
  return <pre className="mt-1 overflow-x-auto bg-paper-deep border border-rule p-2 text-xs num leading-snug">{shown.join('\n')}</pre>;
}

/** "Import" button and dialog: uploads a sheet document and lists every located problem of a bad file. */
export default function ImportDialog({ teamId }: { teamId: string }) {
  const dialog = useRef<HTMLDialogElement>(null);
  const queryClient = useQueryClient();
  const [fileError, setFileError] = useState<string>();
  const upload = useMutation({
    mutationFn: ({ file, title }: { file: File; title: string }) => importFile(teamId, file, title),
    onSuccess: () => void queryClient.invalidateQueries({ queryKey: ['sheets'] }),
  });

  function open() {
    upload.reset();
    setFileError(undefined);
    dialog.current?.showModal();
  }

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const file = form.get('file');
    if (!(file instanceof File) || file.size === 0) return setFileError('Choose a sheet file (.json) first.');
    setFileError(undefined);
    upload.mutate({ file, title: String(form.get('title') ?? '') });
  }

  const failure = upload.error instanceof ImportError ? upload.error : null;
  return (
    <>
      <button type="button" className={secondaryButton} onClick={open} data-testid="import-open">
        Import
      </button>
      <dialog
        ref={dialog}
        className="m-auto w-[min(46rem,calc(100vw-2rem))] border-2 border-ink bg-paper p-0 text-ink shadow-[6px_6px_0_0_var(--color-ink)] backdrop:bg-ink/40"
        aria-labelledby="import-title"
        data-testid="import-dialog"
      >
        <form onSubmit={submit} noValidate className="space-y-4 p-5">
          <header className="flex items-start justify-between gap-4">
            <div>
              <h2 id="import-title" className="text-lg font-semibold">
                Import a sheet file
              </h2>
              <p className="text-sm text-graphite">
                A sheet document (JSON, <code className="num">"format": "slipless.sheet"</code>, version 1), such as an exported revision. It becomes a new
                sheet of this team at revision 1.
              </p>
            </div>
            <button type="button" className="text-graphite hover:text-ink text-xl leading-none" aria-label="Close" onClick={() => dialog.current?.close()}>
              ×
            </button>
          </header>
          <label className={labelClass}>
            File
            <input type="file" name="file" accept=".json,application/json" className={inputClass} data-testid="import-file" aria-invalid={!!fileError} />
          </label>
          {fileError && <FormError message={fileError} />}
          <label className={labelClass}>
            Title <span className="font-normal text-graphite">(optional; the document's own title otherwise)</span>
            <input type="text" name="title" maxLength={160} className={inputClass} />
          </label>

          {upload.isError && (
            <section className="border-l-4 border-sienna pl-3 space-y-2" role="alert" data-testid="import-errors">
              <p className="text-sm font-semibold text-sienna">
                {failure && failure.issues.length > 0
                  ? `Nothing was imported: ${failure.issues.length === 1 ? 'one problem' : `${failure.issues.length} problems`} in the file.`
                  : upload.error.message}
              </p>
              {failure && failure.issues.length > 0 && (
                <ol className="space-y-3 text-sm max-h-80 overflow-y-auto pr-1">
                  {failure.issues.map((issue, i) => (
                    <li key={i} data-testid="import-issue">
                      <p>
                        {issue.line !== undefined && (
                          <span className="num text-xs bg-sienna text-paper px-1 mr-2">
                            line {issue.line}
                            {issue.column !== undefined && `, col ${issue.column}`}
                          </span>
                        )}
                        {issue.path && <code className="num text-xs mr-2">{issue.path}</code>}
                        <span>{issue.message}</span>
                      </p>
                      {issue.line !== undefined && <Excerpt text={failure.text} line={issue.line} column={issue.column} />}
                    </li>
                  ))}
                </ol>
              )}
            </section>
          )}
          {upload.isSuccess && (
            <p className="text-sm border-l-4 border-verdigris pl-3" role="status" data-testid="import-done">
              Imported as a new sheet.{' '}
              <a href={`/sheets/${upload.data.sheetId}`} className="font-semibold underline hover:text-verdigris-deep">
                Open it
              </a>{' '}
              or{' '}
              <a href={`/sheets/${upload.data.sheetId}/history`} className="underline hover:text-verdigris-deep">
                see its history
              </a>
              .
            </p>
          )}
          <footer className="flex justify-end gap-3">
            <button type="button" className={secondaryButton} onClick={() => dialog.current?.close()}>
              Close
            </button>
            <button className={primaryButton} disabled={upload.isPending} data-testid="import-submit">
              {upload.isPending ? 'Importing…' : 'Import'}
            </button>
          </footer>
        </form>
      </dialog>
    </>
  );
}
