import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState, type SubmitEvent } from 'react';
import QueryRoot from '../QueryRoot';
import { requestJson } from '../../lib/client/api';
import { REVIEW_STATE_LABELS, type ReviewThread, type SheetComment, type Verdict, type Wire } from '../../lib/contract';
import { OUTPUTS } from '../../lib/sheet/outputs';
import { REMARK_SECTIONS } from '../../lib/validation/reviews';
import { button, fieldInput, primaryButton } from './sheet-styles';
import { revisionLabel } from '../../lib/view/revision';

interface ReviewPanelProps {
  sheetId: string;
  revision: number;
  canComment: boolean;
  canReview: boolean;
}

const SIGNATURE_TEXT = { checked: 'signed as checked', returned: 'returned for correction' } as const;

const OUTPUT_LABELS = new Map(OUTPUTS.map((output) => [`output.${output.id}`, output.label]));

function when(value: string): string {
  return new Date(value).toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

function Remark({ remark }: { remark: Wire<SheetComment> }) {
  return (
    <>
      <strong>{remark.authorName ?? 'Someone'}</strong>
      <span className="text-xs text-graphite"> · {when(remark.createdAt)}</span>
      {/* The server renders remarks through rehype-sanitize, so this HTML carries no script or javascript: link. */}
      <div className="prose-remark" data-remark-body dangerouslySetInnerHTML={{ __html: remark.html }} />
    </>
  );
}

function Thread({ sheetId, revision, canComment, canReview }: ReviewPanelProps) {
  const queryClient = useQueryClient();
  const [text, setText] = useState('');
  const [anchor, setAnchor] = useState('');
  const [replyTo, setReplyTo] = useState<Wire<SheetComment> | null>(null);
  const [error, setError] = useState<string | null>(null);
  const comments = useQuery({ queryKey: ['comments', sheetId], queryFn: () => requestJson<{ items: Wire<SheetComment>[] }>(`/api/sheets/${sheetId}/comments`) });
  const reviews = useQuery({
    queryKey: ['reviews', sheetId],
    queryFn: () => requestJson<Wire<ReviewThread>>(`/api/sheets/${sheetId}/reviews`),
  });
  const remark = useMutation({
    mutationFn: (body: string) =>
      requestJson(`/api/sheets/${sheetId}/comments`, {
        method: 'POST',
        body: replyTo ? { revision: replyTo.revision, body, parentId: replyTo.id } : { revision, body, ...(anchor ? { anchor } : {}) },
      }),
    onSuccess: () => {
      setText('');
      setReplyTo(null);
      return queryClient.invalidateQueries({ queryKey: ['comments', sheetId] });
    },
    onError: (e: Error) => setError(e.message),
  });
  const resolution = useMutation({
    mutationFn: (value: { id: string; resolved: boolean }) => requestJson(`/api/sheets/${sheetId}/comments`, { method: 'PATCH', body: value }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['comments', sheetId] }),
    onError: (e: Error) => setError(e.message),
  });
  const signature = useMutation({
    mutationFn: (value: Verdict) => requestJson(`/api/sheets/${sheetId}/reviews`, { method: 'POST', body: { revision, verdict: value, body: text } }),
    onSuccess: () => {
      setText('');
      // The title block reads "Checked by" from the page, so the page is loaded again after a signature.
      window.location.reload();
    },
    onError: (e: Error) => setError(e.message),
  });

  function submit(event: SubmitEvent<HTMLFormElement>) {
    event.preventDefault();
    setError(null);
    if (!text.trim()) {
      setError('Write something first.');
      return;
    }
    remark.mutate(text.trim());
  }

  const items = comments.data?.items ?? [];
  const openings = items.filter((c) => c.parentId === null);
  return (
    <section aria-label="Checking" className="border-2 border-ink bg-paper p-5" data-review-panel>
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="font-mono text-sm font-semibold uppercase tracking-[0.2em]">Checking</h2>
        <p className="text-sm">
          <span data-review-status>
            Status: <strong>{reviews.data ? REVIEW_STATE_LABELS[reviews.data.status] : '…'}</strong>
          </span>
          {reviews.data && (
            <span className="text-graphite" data-last-checked>
              {' '}
              of revision <span className="num">{reviews.data.latestRevision}</span> ·{' '}
              {reviews.data.lastCheckedRevision === null ? 'no revision checked yet' : <>last checked revision <span className="num">{reviews.data.lastCheckedRevision}</span></>}
            </span>
          )}
        </p>
      </header>
      <ol className="mt-3 space-y-2 text-sm">
        {(reviews.data?.items ?? []).map((r) => (
          <li key={r.id} className={`border-l-4 pl-3 ${r.verdict === 'checked' ? 'border-verdigris' : 'border-ochre'}`} data-signature={r.verdict}>
            <strong>{r.reviewerName ?? 'A checker'}</strong> {SIGNATURE_TEXT[r.verdict]} revision <span className="num">{r.revision}</span>
            <span className="text-xs text-graphite"> · {when(r.createdAt)}</span>
            {r.body && <p className="whitespace-pre-wrap text-graphite">{r.body}</p>}
          </li>
        ))}
        {openings.map((c) => (
          <li key={c.id} className={`border-l-4 pl-3 ${c.resolvedAt ? 'border-rule opacity-70' : 'border-ochre'}`} data-comment data-resolved={c.resolvedAt ? 'true' : 'false'}>
            <p className="text-xs text-graphite">
              Remark on revision <span className="num">{c.revision}</span>
              {c.anchor && <> · on <span className="font-mono" data-remark-anchor={c.anchor}>{OUTPUT_LABELS.get(c.anchor) ?? c.anchor}</span></>}
              {c.resolvedAt && <> · resolved by {c.resolvedByName ?? 'someone'}</>}
            </p>
            <Remark remark={c} />
            <ol className="ml-4 mt-1 space-y-1 border-l border-rule pl-3">
              {items
                .filter((reply) => reply.parentId === c.id)
                .map((reply) => (
                  <li key={reply.id} data-reply>
                    <Remark remark={reply} />
                  </li>
                ))}
            </ol>
            {canComment && (
              <div className="mt-1 flex gap-3 text-xs">
                <button type="button" className="underline decoration-rule" onClick={() => setReplyTo(c)}>
                  Reply
                </button>
                {c.canResolve && (
                  <button type="button" className="underline decoration-rule" disabled={resolution.isPending} onClick={() => resolution.mutate({ id: c.id, resolved: !c.resolvedAt })}>
                    {c.resolvedAt ? 'Reopen' : 'Resolve'}
                  </button>
                )}
              </div>
            )}
          </li>
        ))}
        {items.length === 0 && reviews.data?.items.length === 0 && <li className="text-graphite">No remarks or signatures yet.</li>}
      </ol>
      {(canComment || canReview) && (
        <form onSubmit={submit} className="mt-4 space-y-2" noValidate>
          {replyTo ? (
            <p className="text-xs text-graphite">
              Replying to {replyTo.authorName ?? 'a remark'} ·{' '}
              <button type="button" className="underline" onClick={() => setReplyTo(null)}>
                cancel
              </button>
            </p>
          ) : (
            <label className="block text-[11px] uppercase tracking-wide text-graphite">
              about
              <select className={fieldInput} value={anchor} onChange={(e) => setAnchor(e.target.value)}>
                <option value="">the whole revision</option>
                <optgroup label="Section">
                  {REMARK_SECTIONS.map((section) => (
                    <option key={section} value={section}>
                      {section}
                    </option>
                  ))}
                </optgroup>
                <optgroup label="Output">
                  {OUTPUTS.map((output) => (
                    <option key={output.id} value={`output.${output.id}`}>
                      {output.label}
                    </option>
                  ))}
                </optgroup>
              </select>
            </label>
          )}
          <label className="block text-[11px] uppercase tracking-wide text-graphite">
            {canReview ? 'remark or signature note' : 'remark'} on {revisionLabel(revision)} (Markdown, $math$)
            <textarea className={`${fieldInput} h-20 font-sans`} value={text} maxLength={4000} onChange={(e) => setText(e.target.value)} />
          </label>
          {error && (
            <p role="alert" className="text-sm text-sienna">
              {error}
            </p>
          )}
          <div className="flex flex-wrap gap-3">
            {canComment && (
              <button className={button} disabled={remark.isPending}>
                {replyTo ? 'Reply' : 'Add remark'}
              </button>
            )}
            {canReview && (
              <>
                <button type="button" className={primaryButton} disabled={signature.isPending} onClick={() => signature.mutate('checked')}>
                  Sign {revisionLabel(revision)} as checked
                </button>
                <button type="button" className={button} disabled={signature.isPending} onClick={() => signature.mutate('returned')}>
                  Return for correction
                </button>
              </>
            )}
          </div>
        </form>
      )}
    </section>
  );
}

/** Remarks and signatures of a sheet: a checker signs a revision as checked or returns it with remarks. */
export default function ReviewPanel(props: ReviewPanelProps) {
  return (
    <QueryRoot>
      <Thread {...props} />
    </QueryRoot>
  );
}
