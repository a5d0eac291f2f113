import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState, type SubmitEvent } from 'react';
import QueryRoot from '../QueryRoot';
import { requestJson } from '../../lib/client/api';
import type { ReviewThread, SheetComment, Verdict, Wire } from '../../lib/contract';
import { button, fieldInput, primaryButton } from './sheet-styles';

interface ReviewPanelProps {
  sheetId: string;
  revision: number;
  canComment: boolean;
  canReview: boolean;
}

const VERDICT_TEXT = { approved: 'approved', 'changes-requested': 'asked for changes' } as const;

function when(value: string): string {
  return new Date(value).toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

function Thread({ sheetId, revision, canComment, canReview }: ReviewPanelProps) {
  const queryClient = useQueryClient();
  const [text, setText] = useState('');
  const [error, setError] = useState<string | null>(null);
  const comments = useQuery({ queryKey: ['comments', sheetId], queryFn: () => requestJson<{ items: Wire<SheetComment>[] }>(`/api/sheets/${sheetId}/comments`) });
  const reviews = useQuery({
    queryKey: ['reviews', sheetId],
    queryFn: () => requestJson<Wire<ReviewThread>>(`/api/sheets/${sheetId}/reviews`),
  });
  const comment = useMutation({
    mutationFn: (body: string) => requestJson(`/api/sheets/${sheetId}/comments`, { method: 'POST', body: { revision, body } }),
    onSuccess: () => {
      setText('');
      return queryClient.invalidateQueries({ queryKey: ['comments', sheetId] });
    },
    onError: (e: Error) => setError(e.message),
  });
  const verdict = useMutation({
    mutationFn: (value: Verdict) => requestJson(`/api/sheets/${sheetId}/reviews`, { method: 'POST', body: { revision, verdict: value, body: text } }),
    onSuccess: () => {
      setText('');
      return queryClient.invalidateQueries({ queryKey: ['reviews', sheetId] });
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
    comment.mutate(text.trim());
  }

  return (
    <section aria-label="Review" className="border-2 border-ink bg-paper p-5" data-review-panel>
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 className="font-mono text-sm font-semibold uppercase tracking-[0.2em]">Review</h2>
        <p className="text-sm">
          <span data-review-status>
            Status: <strong>{reviews.data?.status ?? '…'}</strong>
          </span>
          {reviews.data && (
            <span className="text-graphite" data-last-approved>
              {' '}
              of revision <span className="num">{reviews.data.latestRevision}</span> ·{' '}
              {reviews.data.lastApprovedRevision === null ? 'no revision approved yet' : <>last approved revision <span className="num">{reviews.data.lastApprovedRevision}</span></>}
            </span>
          )}
        </p>
      </header>
      <ol className="mt-3 space-y-2 text-sm">
        {(reviews.data?.items ?? []).map((r) => (
          <li key={r.id} className={`border-l-4 pl-3 ${r.verdict === 'approved' ? 'border-verdigris' : 'border-ochre'}`}>
            <strong>{r.reviewerName ?? 'A reviewer'}</strong> {VERDICT_TEXT[r.verdict]} revision <span className="num">{r.revision}</span>
            <span className="text-xs text-graphite"> · {when(r.createdAt)}</span>
            {r.body && <p className="text-graphite">{r.body}</p>}
          </li>
        ))}
        {(comments.data?.items ?? []).map((c) => (
          <li key={c.id} className="border-l-4 border-rule pl-3" data-comment>
            <strong>{c.authorName ?? 'Someone'}</strong> on revision <span className="num">{c.revision}</span>
            <span className="text-xs text-graphite"> · {when(c.createdAt)}</span>
            <p className="whitespace-pre-wrap">{c.body}</p>
          </li>
        ))}
        {comments.data?.items.length === 0 && reviews.data?.items.length === 0 && <li className="text-graphite">No comments or reviews yet.</li>}
      </ol>
      {(canComment || canReview) && (
        <form onSubmit={submit} className="mt-4 space-y-2" noValidate>
          <label className="block text-[11px] uppercase tracking-wide text-graphite">
            {canReview ? 'comment or review note' : 'comment'} on revision {revision}
            <textarea className={`${fieldInput} h-20 font-sans`} value={text} maxLength={4000} onChange={(e) => setText(e.target.value)} />
          </label>
          {error && (
            <p role="alert" className="text-sm text-sienna">
              {error}
            </p>
          )}
          <div className="flex flex-wrap gap-3">
            {canComment && (
              <button className={button} disabled={comment.isPending}>
                Comment
              </button>
            )}
            {canReview && (
              <>
                <button type="button" className={primaryButton} disabled={verdict.isPending} onClick={() => verdict.mutate('approved')}>
                  Approve revision {revision}
                </button>
                <button type="button" className={button} disabled={verdict.isPending} onClick={() => verdict.mutate('changes-requested')}>
                  Ask for changes
                </button>
              </>
            )}
          </div>
        </form>
      )}
    </section>
  );
}

/** Comments and reviews of a sheet: reviewers approve a revision or ask for changes. */
export default function ReviewPanel(props: ReviewPanelProps) {
  return (
    <QueryRoot>
      <Thread {...props} />
    </QueryRoot>
  );
}
