// Status badge and progress wording of a run (shared by the object page's run list and the run page).
import type { RunStatus, RunSummary } from '../../../shared/schemas/runs';
import { JobStatusBadge } from '../../components/JobStatus';

export function RunStatusBadge({ status }: { status: RunStatus }) {
  return <JobStatusBadge status={status} testId="run-status" />;
}

const STAGES: Record<string, string> = { starting: 'starting the engine', linear: 'linear method', lov: 'line of variations', mc: 'Monte Carlo' };

/** "line of variations 60 of 161 · 120 clones/s · about 12 s left", or '' when there is nothing to say. */
export function progressText(r: Pick<RunSummary, 'status' | 'progress'>): string {
  if (r.status !== 'running') return '';
  const p = r.progress;
  const parts: string[] = [];
  const stage = p.stage ? (STAGES[p.stage] ?? p.stage) : 'starting';
  parts.push(p.total > 1 ? `${stage} ${p.done} of ${p.total}` : stage);
  if (p.rateClonesPerS !== null) parts.push(`${Math.round(p.rateClonesPerS)} clones/s`);
  if (p.etaS !== null && p.etaS > 0) parts.push(`about ${p.etaS < 90 ? `${Math.ceil(p.etaS)} s` : `${Math.ceil(p.etaS / 60)} min`} left`);
  return parts.join(' · ');
}
