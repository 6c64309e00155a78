// Status badge and progress wording of an orbit-fit job.
import type { FitJob } from '../../../shared/schemas/odApi';
import { JobProgressBar, JobStatusBadge } from '../../components/JobStatus';

export function FitStatusBadge({ status }: { status: FitJob['status'] }) {
  return <JobStatusBadge status={status} testId="fit-status" />;
}

/** "gravity-only fit 4 of 25" or '' when there is nothing to say. */
export function fitProgressText(f: Pick<FitJob, 'status' | 'progressStage' | 'progressDone' | 'progressTotal'>): string {
  if (f.status === 'queued') return 'Waiting for the runner…';
  if (f.status !== 'running') return '';
  const stage = f.progressStage ?? 'starting';
  return f.progressTotal > 1 ? `${stage} ${f.progressDone} of ${f.progressTotal}` : stage;
}

export function FitProgress({ fit }: { fit: FitJob }) {
  return <JobProgressBar label="Fit progress" status={fit.status} done={fit.progressDone} total={fit.progressTotal} text={fitProgressText(fit)} />;
}
