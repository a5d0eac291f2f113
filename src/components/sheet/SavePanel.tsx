import { useMutation } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import { ApiError, requestJson } from '../../lib/client/api';
import type { CreatedSheet, LatestRevision, SavedRevision, StaleSaveError, Wire } from '../../lib/contract';
import type { StoredDocument } from '../../lib/sheet/summary';
import { describeValue, diffDocuments, pathText, rebaseDocument, type DocumentChange } from '../../lib/sheet/document-path';
import { SHORTCUTS, withShortcut } from '../../lib/view/shortcuts';
import { button, fieldInput, primaryButton } from './sheet-styles';
import { useShortcut } from './useShortcut';
import { revisionLabel } from '../../lib/view/revision';

/** The stale save's 409: someone saved after our base; the error carries their revision, so the conflict panel needs no second request. */
function staleSave(error: unknown): StaleSaveError | null {
  return error instanceof ApiError && error.status === 409 && error.body.latest ? (error.body as unknown as StaleSaveError) : null;
}

function ChangeList({ changes, testId }: { changes: DocumentChange[]; testId: string }) {
  if (changes.length === 0) return <p className="text-xs text-graphite">no changes</p>;
  return (
    <ul className="max-h-48 overflow-auto text-xs" data-changes={testId}>
      {changes.map((c) => (
        <li key={pathText(c.path)} className="border-b border-rule/60 py-0.5">
          <span className="font-mono">{pathText(c.path)}</span>: <span className="num text-graphite line-through">{describeValue(c.before)}</span> →{' '}
          <span className="num">{describeValue(c.after)}</span>
        </li>
      ))}
    </ul>
  );
}

export interface SavePanelProps {
  sheetId: string;
  baseRevision: number;
  baseDocument: StoredDocument;
  document: StoredDocument;
  dirty: boolean;
  readsCleanly: boolean;
  onSaved: (revision: number, saved: StoredDocument) => void;
  onReplaceDocument: (base: StoredDocument, baseRevision: number, document: StoredDocument) => void;
  /** Teams the user may fork into; the sheet's own team first. */
  forkTargets: { teamId: string; name: string }[];
}

/** Save with a message; on a stale base, show what the other revision changed and offer re-apply or fork. Nothing is dropped. */
export default function SavePanel(props: SavePanelProps) {
  const { sheetId, baseRevision, baseDocument, document } = props;
  const [message, setMessage] = useState('');
  const [theirs, setTheirs] = useState<LatestRevision | null>(null);
  const conflict = theirs?.number ?? null;
  const [notice, setNotice] = useState<string | null>(null);
  const [forkTeam, setForkTeam] = useState(props.forkTargets[0]?.teamId ?? '');
  const saveButton = useRef<HTMLButtonElement>(null);
  // A click keeps the button's own rules: nothing happens while it is disabled (no changes, saving).
  useShortcut('save', () => saveButton.current?.click());

  const save = useMutation({
    mutationFn: (input: { base: number; doc: StoredDocument }) =>
      requestJson<Wire<SavedRevision>>(`/api/sheets/${sheetId}/revisions`, {
        method: 'POST',
        body: {
          baseRevision: input.base,
          document: input.doc,
          message: message.trim() || 'Saved',
        },
      }),
    onSuccess: (reply, input) => {
      setTheirs(null);
      setMessage('');
      setNotice(`Saved as ${revisionLabel(reply.revision)}.`);
      props.onSaved(reply.revision, input.doc);
    },
    onError: (error) => {
      const stale = staleSave(error);
      if (stale) setTheirs(stale.latest);
    },
  });

  const fork = useMutation({
    mutationFn: async () => {
      const created = await requestJson<Wire<CreatedSheet>>(`/api/sheets/${sheetId}/fork`, { method: 'POST', body: { revision: baseRevision, ...(forkTeam ? { teamId: forkTeam } : {}) } });
      if (props.dirty) {
        await requestJson(`/api/sheets/${created.sheetId}/revisions`, {
          method: 'POST',
          body: { baseRevision: 1, document, message: message.trim() || `My changes on top of ${revisionLabel(baseRevision)}` },
        });
      }
      return created.sheetId;
    },
    onSuccess: (forkId) => {
      props.onSaved(baseRevision, baseDocument);
      window.location.assign(`/sheets/${forkId}`);
    },
  });

  // Both lists show only in the conflict panel: no diff of the whole document on every keystroke otherwise.
  const theirChanges = theirs ? diffDocuments(baseDocument, theirs.inputs) : [];
  const myChanges = theirs ? diffDocuments(baseDocument, document) : [];

  function reapply() {
    if (!theirs || conflict === null) return;
    const rebased = rebaseDocument(baseDocument, document, theirs.inputs);
    props.onReplaceDocument(theirs.inputs, conflict, rebased.document);
    if (rebased.overlapping.length > 0) {
      setNotice(`Re-applied on top of ${revisionLabel(conflict)}; ${rebased.overlapping.length} field(s) were changed on both sides and now hold your value. Check them, then save.`);
      setTheirs(null);
      return;
    }
    save.mutate({ base: conflict, doc: rebased.document });
  }

  const saveError = save.error && !(save.error instanceof ApiError && save.error.status === 409) ? save.error : null;
  const saveIssues = saveError instanceof ApiError ? saveError.issues : [];

  return (
    <div className="space-y-3">
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(event) => {
          event.preventDefault();
          setNotice(null);
          save.mutate({ base: baseRevision, doc: document });
        }}
      >
        <label className="min-w-64 flex-1 text-[11px] uppercase tracking-wide text-graphite">
          revision message
          <input className={`${fieldInput} font-sans`} value={message} maxLength={500} placeholder="What changed and why" onChange={(event) => setMessage(event.target.value)} />
        </label>
        <button
          ref={saveButton}
          type="submit"
          className={primaryButton}
          disabled={save.isPending || !props.dirty}
          aria-keyshortcuts={SHORTCUTS.save.keys}
          title={withShortcut(props.readsCleanly ? 'Save revision' : 'The sheet has errors; saving keeps them out of the stored revision only if fixed', 'save')}
        >
          {save.isPending ? 'Saving…' : 'Save revision'}
        </button>
        <button type="button" className={button} disabled={fork.isPending} onClick={() => fork.mutate()}>
          {fork.isPending ? 'Forking…' : props.dirty ? 'Fork with my changes' : 'Fork'}
        </button>
        {props.forkTargets.length > 1 && (
          <label className="text-[11px] uppercase tracking-wide text-graphite">
            fork into
            <select className={`${fieldInput} font-sans`} value={forkTeam} onChange={(event) => setForkTeam(event.target.value)} data-fork-team>
              {props.forkTargets.map((t) => (
                <option key={t.teamId} value={t.teamId}>
                  {t.name}
                </option>
              ))}
            </select>
          </label>
        )}
        <span className="text-xs text-graphite" role="status" data-save-status>
          {props.dirty ? 'Unsaved changes (kept in this browser until saved)' : 'All changes saved'}
          {notice ? ` · ${notice}` : ''}
        </span>
      </form>
      {saveError && (
        <div role="alert" className="border-l-4 border-sienna pl-3 text-sm text-sienna">
          {saveError.message}
          {saveIssues.length > 1 && (
            <ul className="text-xs">
              {saveIssues.slice(0, 8).map((issue) => (
                <li key={issue.path + issue.message}>
                  <span className="font-mono">{issue.path}</span>: {issue.message}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      {fork.error && <p role="alert" className="text-sm text-sienna">{fork.error.message}</p>}
      {conflict !== null && (
        <section aria-label="Save conflict" className="border-2 border-ochre bg-paper p-4" data-conflict>
          <h3 className="font-semibold">Someone saved {revisionLabel(conflict)} after {revisionLabel(baseRevision)}, which you started from.</h3>
          <p className="text-sm text-graphite">Nothing was overwritten and your changes are still here. Compare the two, then choose.</p>
          {theirs && (
            <div className="mt-3 grid gap-4 md:grid-cols-2">
              <div>
                <h4 className="text-xs font-semibold uppercase tracking-wide">
                  Their {revisionLabel(conflict)}: {theirs.message || 'no message'} ({theirs.authorName ?? 'someone'})
                </h4>
                <ChangeList changes={theirChanges} testId="theirs" />
              </div>
              <div>
                <h4 className="text-xs font-semibold uppercase tracking-wide">Your unsaved changes</h4>
                <ChangeList changes={myChanges} testId="mine" />
              </div>
            </div>
          )}
          <div className="mt-3 flex flex-wrap gap-3">
            <button type="button" className={primaryButton} disabled={!theirs || save.isPending} onClick={reapply}>
              Re-apply mine on top of {revisionLabel(conflict)} and save
            </button>
            <button type="button" className={button} disabled={fork.isPending} onClick={() => fork.mutate()}>
              Save mine as a fork
            </button>
            <button type="button" className={button} onClick={() => setTheirs(null)}>
              Keep editing
            </button>
          </div>
        </section>
      )}
    </div>
  );
}
