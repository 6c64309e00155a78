// Status badge and progress bar of a durable job (assessment runs, orbit fits): both share the status set of the
// job queue (shared/schemas/runs.ts RUN_STATUSES); each kind supplies its own test id, bar label and wording.
import type { RunStatus } from '../../shared/schemas/runs';

const LABELS: Record<RunStatus, string> = { queued: 'Queued', running: 'Running', done: 'Done', failed: 'Failed', cancelled: 'Cancelled' };
const TONES: Record<RunStatus, string> = {
  queued: 'bg-accent-50 text-accent-800 border-accent-100',
  running: 'bg-signal-50 text-signal-700 border-signal-200',
  done: 'bg-ok-50 text-ok-700 border-ok-700/30',
  failed: 'bg-danger-50 text-danger-700 border-danger-200',
  cancelled: 'bg-white text-ink-soft border-rule',
};

export function JobStatusBadge({ status, testId }: { status: RunStatus; testId: string }) {
  return <span className={`inline-block rounded border px-2 py-0.5 text-xs font-semibold ${TONES[status]}`} data-testid={testId}>{LABELS[status]}</span>;
}

/** A done job shows a full bar; otherwise done of total (an empty bar while the total is unknown). */
export function JobProgressBar({ label, status, done, total, text }: { label: string; status: RunStatus; done: number; total: number; text: string }) {
  const fraction = status === 'done' ? 1 : total > 0 ? Math.min(1, done / total) : 0;
  return (
    <div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(fraction * 100)}
        className="h-3 w-full overflow-hidden rounded-full border border-rule bg-white"
      >
        <div className="h-full bg-accent-700 transition-[width]" style={{ width: `${fraction * 100}%` }} />
      </div>
      <p className="mt-1 text-sm text-ink-soft" aria-live="polite">{text}</p>
    </div>
  );
}
