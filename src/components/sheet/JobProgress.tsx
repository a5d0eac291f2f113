import { dangerButton } from '../form-parts';
import type { JobState } from './useWorkerJob';

/** Progress bar with a cancel button (and the job's own words on its progress) while a worker job runs, and the outcome when it was cancelled or failed. */
export default function JobProgress({ state, unit, onCancel }: { state: JobState<unknown>; unit: string; onCancel: () => void }) {
  if (state.status === 'failed') {
    return (
      <p className="border-l-4 border-sienna pl-3 text-sm text-sienna" role="alert">
        {state.message}
      </p>
    );
  }
  if (state.status === 'cancelled') {
    return (
      <p className="border-l-4 border-ochre pl-3 text-sm" role="status" data-testid="job-cancelled">
        {state.total > 0 ? (
          <>
            Cancelled after <span className="num">{state.done.toLocaleString('en')}</span> of{' '}
            <span className="num">{state.total.toLocaleString('en')}</span> {unit}.
          </>
        ) : (
          'Cancelled before the first progress report.'
        )}
      </p>
    );
  }
  if (state.status !== 'running') return null;
  const fraction = state.total > 0 ? state.done / state.total : 0;
  return (
    <div data-testid="job-progress">
      <div className="flex items-center gap-3">
        <div
          className="h-3 flex-1 border-2 border-ink bg-paper-deep"
          role="progressbar"
          aria-label={`Progress in ${unit}`}
          aria-valuemin={0}
          aria-valuemax={state.total}
          aria-valuenow={state.done}
        >
          {/* Scaled, not resized: a width change repainted the page every frame. Not eased either: each frame of an easing is one
              more frame for a software compositor to draw, and progress already arrives at most once a frame. */}
          <div className="h-full origin-left bg-verdigris" style={{ transform: `scaleX(${fraction.toFixed(3)})` }} />
        </div>
        <span className="num w-44 text-right text-xs text-graphite">
          {state.done.toLocaleString('en')} / {state.total > 0 ? state.total.toLocaleString('en') : '…'} {unit}
        </span>
        <button type="button" onClick={onCancel} className={dangerButton}>
          Cancel
        </button>
      </div>
      {state.detail && <p className="num mt-1 text-xs text-graphite" data-job-detail>{state.detail}</p>}
    </div>
  );
}
