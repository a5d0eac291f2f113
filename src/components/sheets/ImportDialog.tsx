import { useQueryClient } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import { ApiError, requestJson } from '../../lib/client/api';
import { useZodForm } from '../../lib/client/use-zod-form';
import type { CreatedSheet, Wire } from '../../lib/contract';
import { importBody } from '../../lib/validation/sheet-exchange';
import { FormError, inputClass, labelClass, primaryButton, secondaryButton } from '../form-parts';

/** The lines around a located issue, with a caret under the column, as an editor would show them. */
export function Excerpt({ text, line, column }: { text: string; line: number; column?: number }) {
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
  // The file's text, kept to show the lines around each located problem.
  const [content, setContent] = useState('');
  const [importedId, setImportedId] = useState<string>();
  const upload = useZodForm({
    schema: importBody,
    fields: [],
    read: async (form) => {
      const fields = new FormData(form);
      const file = fields.get('file');
      const chosen = file instanceof File && file.size > 0 ? file : null;
      const text = chosen ? await chosen.text() : undefined;
      setContent(text ?? '');
      const title = String(fields.get('title') ?? '').trim();
      return { teamId, fileName: chosen?.name, content: text, ...(title ? { title } : {}) };
    },
    submit: async (body) => {
      const { sheetId } = await requestJson<Wire<CreatedSheet>>('/api/sheets/import', { method: 'POST', body });
      setImportedId(sheetId);
      void queryClient.invalidateQueries({ queryKey: ['sheets'] });
    },
  });

  function open() {
    upload.reset();
    dialog.current?.showModal();
  }

  const inputError = upload.failure ? undefined : Object.values(upload.errors)[0];
  const issues = upload.failure instanceof ApiError ? upload.failure.issues : [];
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
        <form onSubmit={upload.onSubmit} noValidate className="space-y-4 p-5">
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
            <input type="file" name="file" accept=".json,application/json" className={inputClass} data-testid="import-file" aria-invalid={!!upload.errors.content} />
          </label>
          {inputError && <FormError message={inputError} />}
          <label className={labelClass}>
            Title <span className="font-normal text-graphite">(optional; the document's own title otherwise)</span>
            <input type="text" name="title" maxLength={160} className={inputClass} />
          </label>

          {upload.failure !== null && (
            <section className="border-l-4 border-sienna pl-3 space-y-2" role="alert" data-testid="import-errors">
              <p className="text-sm font-semibold text-sienna">
                {issues.length > 0 ? `Nothing was imported: ${issues.length === 1 ? 'one problem' : `${issues.length} problems`} in the file.` : upload.errors.form}
              </p>
              {issues.length > 0 && (
                <ol className="space-y-3 text-sm max-h-80 overflow-y-auto pr-1">
                  {issues.map((issue, i) => (
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
                      {issue.line !== undefined && <Excerpt text={content} line={issue.line} column={issue.column} />}
                    </li>
                  ))}
                </ol>
              )}
            </section>
          )}
          {upload.succeeded && importedId && (
            <p className="text-sm border-l-4 border-verdigris pl-3" role="status" data-testid="import-done">
              Imported as a new sheet.{' '}
              <a href={`/sheets/${importedId}`} className="font-semibold underline hover:text-verdigris-deep">
                Open it
              </a>{' '}
              or{' '}
              <a href={`/sheets/${importedId}/history`} className="underline hover:text-verdigris-deep">
                see its history
              </a>
              .
            </p>
          )}
          <footer className="flex justify-end gap-3">
            <button type="button" className={secondaryButton} onClick={() => dialog.current?.close()}>
              Close
            </button>
            <button className={primaryButton} disabled={upload.submitting} data-testid="import-submit">
              {upload.submitting ? 'Importing…' : 'Import'}
            </button>
          </footer>
        </form>
      </dialog>
    </>
  );
}
