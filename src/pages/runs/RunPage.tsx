// One assessment run: live status and progress (polled every second while queued or running), cancel, the
// failure reason, provenance, and when done the results (src/components/results: encounter table, plots,
// consequence ranges, exports) from the engine's JSON (with a JSON download).
import { Link, useNavigate, useParams } from 'react-router';
import type { Run } from '../../../shared/schemas/runs';
import { isFinished, useCancelRun, useCreateRun, useRun } from '../../api/runs';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, errorMessage } from '../../components/ui';
import { JobProgressBar } from '../../components/JobStatus';
import { formatUtc } from '../objects/format';
import { RunStatusBadge, progressText } from './RunStatus';
import { RunResults } from '../../components/results/RunResults';
import { downloadBlob, fileSafe } from '../../components/results/download';

function ProgressBar({ run }: { run: Run }) {
  const text = run.status === 'running' ? progressText(run) : run.status === 'queued' ? 'Waiting for the runner…' : '';
  return <JobProgressBar label="Run progress" status={run.status} done={run.progress.done} total={run.progress.total} text={text} />;
}

function downloadJson(run: Run) {
  downloadBlob(`tocsin-run-${run.id}-${fileSafe(run.objectDesignation)}.json`, new Blob([JSON.stringify(run.result, null, 2)], { type: 'application/json' }));
}

const PROVENANCE_KEYS: [string, string][] = [
  ['solutionVersion', 'Solution version'],
  ['inputSha256', 'Input SHA-256'],
  ['engineVersion', 'Engine'],
  ['ephemeris', 'Ephemeris'],
  ['integrator', 'Integrator'],
  ['tolerance', 'Tolerance'],
  ['methods', 'Methods'],
  ['seed', 'Seed'],
  ['clones', 'Clones'],
  ['analysisUtc', 'Analysis date (UTC)'],
  ['attempt', 'Attempt'],
];

/** Queue the same request again (same solution version, window, methods, clones, seed, bodies): a reviewer's check. */
function RunAgainButton({ run }: { run: Run }) {
  const navigate = useNavigate();
  const create = useCreateRun();
  const o = run.options;
  return (
    <>
      <Button
        variant="secondary"
        busy={create.isPending}
        onClick={() =>
          create.mutate(
            { solutionId: run.solutionId, until: o.until, methods: o.methods, clones: o.clones, seed: o.seed, bodies: o.bodies, maxAu: o.maxAu },
            { onSuccess: (next) => navigate(`/runs/${next.id}`) },
          )
        }
      >
        Run again
      </Button>
      {create.isError && <Notice tone="error">{errorMessage(create.error)}</Notice>}
    </>
  );
}

export function RunPage() {
  const id = Number(useParams().id);
  const ability = useAppAbility();
  const query = useRun(id);
  const cancel = useCancelRun(id);
  if (query.isPending) return <LoadingState label="Loading the run…" />;
  if (query.isError) return <ErrorState error={query.error} onRetry={() => query.refetch()} />;
  const run = query.data;
  const result = run.result;
  return (
    <div>
      <title>{`Run #${run.id} · ${run.objectDesignation} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/objects/${run.objectId}`}>← {run.objectDesignation}</Link>
      </p>
      <PageHeader
        title={`Run #${run.id}: ${run.objectDesignation} v${run.solutionVersion}`}
        intro={
          <p>
            {run.options.methods.join(', ')} to {run.options.until} · bodies {run.options.bodies.join(', ')}
            {run.options.methods.includes('mc') ? ` · ${run.options.clones} clones, seed ${run.options.seed}` : ''} · requested {formatUtc(run.createdAt)}
            {run.createdBy ? ` by ${run.createdBy.name}` : ''}
          </p>
        }
        actions={
          !isFinished(run.status) && ability.can('delete', 'Run') ? (
            <Button variant="danger-outline" busy={cancel.isPending} onClick={() => cancel.mutate()}>
              Cancel the run
            </Button>
          ) : isFinished(run.status) ? (
            <>
              {result && <Button variant="secondary" onClick={() => downloadJson(run)}>Download JSON</Button>}
              {ability.can('create', 'Run') && <RunAgainButton run={run} />}
            </>
          ) : undefined
        }
      />
      <div className="space-y-6">
        <Card>
          <div className="mb-3 flex items-center gap-3">
            <RunStatusBadge status={run.status} />
            {run.startedAt && <span className="text-sm text-ink-soft">started {formatUtc(run.startedAt)}</span>}
            {run.finishedAt && <span className="text-sm text-ink-soft">· finished {formatUtc(run.finishedAt)}</span>}
            {run.attempts > 1 && <span className="text-sm text-ink-soft">· attempt {run.attempts} (resumed after a restart)</span>}
          </div>
          {!isFinished(run.status) && <ProgressBar run={run} />}
          {run.status === 'failed' && <Notice tone="error" title="The run failed">{run.error}</Notice>}
          {run.status === 'cancelled' && <Notice tone="caution" title="The run was cancelled">{run.error}</Notice>}
          {cancel.isError && <Notice tone="error" className="mt-3">{errorMessage(cancel.error)}</Notice>}
        </Card>

        {result && <RunResults run={run} />}

        {run.provenance && (
          <section aria-labelledby="provenance-heading">
            <h2 id="provenance-heading" className="mb-2 text-lg font-semibold">Provenance</h2>
            <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
              {PROVENANCE_KEYS.filter(([k]) => run.provenance![k] !== undefined).map(([k, label]) => (
                <div key={k} className="contents">
                  <dt className="font-medium">{label}</dt>
                  <dd className="break-all text-ink-soft">{Array.isArray(run.provenance![k]) ? (run.provenance![k] as unknown[]).join(', ') : String(run.provenance![k] ?? '—')}</dd>
                </div>
              ))}
            </dl>
          </section>
        )}
      </div>
    </div>
  );
}
