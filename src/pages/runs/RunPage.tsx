// One assessment run: live status and progress (polled every second while queued or running), cancel, the
// failure reason, provenance, and when done the encounter table from the engine's JSON (with a JSON download).
import { Link, useNavigate, useParams } from 'react-router';
import type { Run } from '../../../shared/schemas/runs';
import { isFinished, useCancelRun, useCreateRun, useRun } from '../../api/runs';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, errorMessage } from '../../components/ui';
import { formatNumber, formatUtc } from '../objects/format';
import { RunStatusBadge, progressText } from './RunStatus';

/** Mean Earth-Moon distance, km (lunar distance as used for close-approach tables; common practice, no source). */
const LUNAR_DISTANCE_KM = 384_400;

type Approach = {
  body: string;
  utc: string;
  epochTdbJd: number;
  distanceKm: number;
  distanceSigmaKm: number | null;
  distanceRangeKm: { threeSigma: [number, number] } | null;
  relativeSpeedKmS: number;
  vInfinityKmS: number | null;
  impactProbability: { linear: number | null; monteCarlo: { estimate: number | null; hits: number | null; samples: number | null }; lov: number | null };
  energyMt: { nominal: number | null; low: number | null; high: number | null };
  palermo: number | null;
  torino: number | null;
  ratingProbabilitySource: string | null;
  methodFlags?: string[];
};

function ProgressBar({ run }: { run: Run }) {
  const { done, total } = run.progress;
  const fraction = run.status === 'done' ? 1 : total > 0 ? Math.min(1, done / total) : 0;
  return (
    <div>
      <div
        role="progressbar"
        aria-label="Run progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(fraction * 100)}
        className="h-3 w-full overflow-hidden rounded-full border border-rule bg-white"
      >
        <div className="h-full bg-accent-700 transition-[width]" style={{ width: `${fraction * 100}%` }} />
      </div>
      <p className="mt-1 text-sm text-ink-soft" aria-live="polite">{run.status === 'running' ? progressText(run) : run.status === 'queued' ? 'Waiting for the runner…' : ''}</p>
    </div>
  );
}

function ip(a: Approach): string {
  const p = a.impactProbability;
  const parts: string[] = [];
  if (p.linear !== null) parts.push(`linear ${formatNumber(p.linear, 3)}`);
  if (p.lov !== null) parts.push(`LOV ${formatNumber(p.lov, 3)}`);
  if (p.monteCarlo.samples !== null) parts.push(`MC ${formatNumber(p.monteCarlo.estimate, 3)} (${p.monteCarlo.hits}/${p.monteCarlo.samples})`);
  return parts.length ? parts.join(' · ') : '—';
}

function EncounterTable({ result }: { result: Record<string, unknown> }) {
  const approaches = (result.approaches ?? []) as Approach[];
  if (approaches.length === 0) return <p className="text-ink-soft">No close approach within the reporting distance in this window.</p>;
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-white">
      <table className="w-full min-w-[64rem] text-left text-sm" data-testid="encounter-table">
        <thead className="bg-accent-50">
          <tr>
            <th scope="col" className="px-3 py-2">Date (UTC)</th>
            <th scope="col" className="px-3 py-2">TDB (JD)</th>
            <th scope="col" className="px-3 py-2">Body</th>
            <th scope="col" className="px-3 py-2">Nominal distance</th>
            <th scope="col" className="px-3 py-2">3σ range (km)</th>
            <th scope="col" className="px-3 py-2">Rel. speed / v∞ (km/s)</th>
            <th scope="col" className="px-3 py-2">Impact probability</th>
            <th scope="col" className="px-3 py-2">Palermo</th>
            <th scope="col" className="px-3 py-2">Torino</th>
            <th scope="col" className="px-3 py-2">Energy (Mt)</th>
          </tr>
        </thead>
        <tbody>
          {approaches.map((a, i) => (
            <tr key={i} className="border-t border-rule align-top tabular-nums">
              <td className="px-3 py-2">{formatUtc(a.utc)}</td>
              <td className="px-3 py-2">{a.epochTdbJd.toFixed(5)}</td>
              <td className="px-3 py-2 capitalize">{a.body}</td>
              <td className="px-3 py-2">
                {formatNumber(a.distanceKm, 6)} km
                <br />
                <span className="text-ink-soft">{formatNumber(a.distanceKm / LUNAR_DISTANCE_KM, 4)} LD</span>
              </td>
              <td className="px-3 py-2">{a.distanceRangeKm ? `${formatNumber(a.distanceRangeKm.threeSigma[0], 4)} – ${formatNumber(a.distanceRangeKm.threeSigma[1], 4)}` : '—'}</td>
              <td className="px-3 py-2">{formatNumber(a.relativeSpeedKmS, 4)} / {formatNumber(a.vInfinityKmS, 4)}</td>
              <td className="px-3 py-2">
                {ip(a)}
                {a.ratingProbabilitySource && <><br /><span className="text-ink-soft">rated with {a.ratingProbabilitySource}</span></>}
                {a.methodFlags && a.methodFlags.length > 0 && <><br /><span className="text-signal-700">{a.methodFlags.join('; ')}</span></>}
              </td>
              <td className="px-3 py-2">{a.palermo === null ? '—' : a.palermo.toFixed(2)}</td>
              <td className="px-3 py-2">{a.torino ?? '—'}</td>
              <td className="px-3 py-2">{a.energyMt.nominal === null ? '—' : `${formatNumber(a.energyMt.nominal, 3)} (${formatNumber(a.energyMt.low, 2)} – ${formatNumber(a.energyMt.high, 2)})`}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function downloadJson(run: Run) {
  const blob = new Blob([JSON.stringify(run.result, null, 2)], { type: 'application/json' });
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = `tocsin-run-${run.id}-${run.objectDesignation.replace(/[^A-Za-z0-9_-]+/g, '_')}.json`;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
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

        {result && (
          <section aria-labelledby="encounters-heading" className="space-y-3">
            <h2 id="encounters-heading" className="text-lg font-semibold">Close approaches</h2>
            <p className="text-sm text-ink-soft">
              Cumulative Palermo {typeof result.palermoCumulative === 'number' ? result.palermoCumulative.toFixed(2) : '—'} · maximum Torino {String(result.torinoMax ?? '—')}
            </p>
            <EncounterTable result={result} />
          </section>
        )}

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
