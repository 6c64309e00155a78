// Status badge and progress wording of an orbit-fit job.
import type { FitJob } from '../../../shared/schemas/odApi';

const LABELS: Record<FitJob['status'], string> = { queued: 'Queued', running: 'Running', done: 'Done', failed: 'Failed', cancelled: 'Cancelled' };
const TONES: Record<FitJob['status'], string> = {
  queued: 'bg-accent-50 text-accent-800 border-accent-100',
  running: 'bg-signal-50 text-signal-700 border-signal-200',
  done: 'bg-ok-50 text-ok-700 border-ok-700/30',
  failed: 'bg-danger-50 text-danger-700 border-danger-200',
  cancelled: 'bg-white text-ink-soft border-rule',
};

export function FitStatusBadge({ status }: { status: FitJob['status'] }) {
  return <span className={`inline-block rounded border px-2 py-0.5 text-xs font-semibold ${TONES[status]}`} data-testid="fit-status">{LABELS[status]}</span>;
}

/** "gravity-only fit 4 of 25" or '' when there is nothing to say. */
export function fitProgressText(f: Pick<FitJob, 'status' | 'progressStage' | 'progressDone' | 'progressTotal'>): string {
  if (f.status === 'queued') return 'Waiting for the runner…';
  if (f.status !== 'running') return '';
  const stage = f.progressStage ?? 'starting';
  return f.progressTotal > 1 ? `${stage} ${f.progressDone} of ${f.progressTotal}` : stage;
}

export function FitProgress({ fit }: { fit: FitJob }) {
  const fraction = fit.status === 'done' ? 1 : fit.progressTotal > 0 ? Math.min(1, fit.progressDone / fit.progressTotal) : 0;
  return (
    <div>
      <div
        role="progressbar"
        aria-label="Fit progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(fraction * 100)}
        className="h-3 w-full overflow-hidden rounded-full border border-rule bg-white"
      >
        <div className="h-full bg-accent-700 transition-[width]" style={{ width: `${fraction * 100}%` }} />
      </div>
      <p className="mt-1 text-sm text-ink-soft" aria-live="polite">{fitProgressText(fit)}</p>
    </div>
  );
}
