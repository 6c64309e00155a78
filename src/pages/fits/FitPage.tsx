// One orbit-fit job: status and progress while it runs (polled every second), cancel, the failure reason; when
// done: the comparison of the gravity-only and non-gravitational fits with the verdict, the summary of each fit,
// the residual plots and table, provenance, and adopting one fit as the object's next solution version.
import { useMemo, useState } from 'react';
import { Link, useParams } from 'react-router';
import type { Residual } from '../../../shared/schemas/od';
import type { FitJob } from '../../../shared/schemas/odApi';
import { isFitFinished, useAstrometry, useCancelFit, useFit } from '../../api/od';
import { useAppAbility } from '../../auth/useAppAbility';
import { downloadBlob, fileSafe } from '../../components/results/download';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, errorMessage } from '../../components/ui';
import { formatUtc } from '../objects/format';
import { odAccess } from './access';
import { AdoptDialog } from './AdoptDialog';
import { ComparisonView } from './ComparisonView';
import { FitSummary } from './FitSummary';
import { StationStatistics } from './StationStatistics';
import { FitProgress, FitStatusBadge } from './FitStatus';
import { FIT_LABELS } from './format';
import { ResidualPlots } from './ResidualPlots';
import { ResidualTable } from './ResidualTable';
import { stationWeightsText } from './stationWeights';

function downloadJson(fit: FitJob) {
  downloadBlob(`tocsin-fit-${fit.id}-${fileSafe(fit.designation)}.json`, new Blob([JSON.stringify(fit.result, null, 2)], { type: 'application/json' }));
}

/**
 * Residuals of observations an analyst has excluded since the fit (greyed in the plots and the table): the fit's
 * input order maps residual.index to a stored observation id (observationIds).
 */
function useExcludedLookup(fit: FitJob | undefined, enabled: boolean): { excluded?: (r: Residual) => boolean; excludedIds: Set<number> } {
  const astrometry = useAstrometry(fit?.objectId ?? 0, { enabled: enabled && fit !== undefined && fit.result !== null });
  return useMemo(() => {
    const excludedIds = new Set((astrometry.data?.observations ?? []).filter((o) => o.excluded).map((o) => o.id));
    if (!fit || excludedIds.size === 0) return { excludedIds };
    const ids = fit.observationIds ?? [];
    return { excluded: (r: Residual) => excludedIds.has(ids[r.index] ?? -1), excludedIds };
  }, [fit, astrometry.data]);
}

export function FitPage() {
  const id = Number(useParams().id);
  const access = odAccess(useAppAbility());
  const query = useFit(id);
  const cancel = useCancelFit(id);
  const [adopting, setAdopting] = useState(false);
  const { excluded, excludedIds } = useExcludedLookup(query.data, access.readAstrometry);
  if (query.isPending) return <LoadingState label="Loading the fit…" />;
  if (query.isError) return <ErrorState error={query.error} onRetry={() => void query.refetch()} />;
  const fit = query.data;
  const result = fit.result;
  const s = fit.settings;
  const fits = result ? [result.gravityOnly, ...(result.nonGrav ? [result.nonGrav] : [])] : [];
  return (
    <div>
      <title>{`Fit #${fit.id} · ${fit.designation} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/objects/${fit.objectId}/fits`}>← Orbit fits of {fit.designation}</Link>
      </p>
      <PageHeader
        title={`Fit #${fit.id}: ${fit.designation}`}
        intro={
          <p>
            {fit.observationCount} observations · {s.nonGravTerms.length ? `gravity only vs ${s.nonGravTerms.map((t) => t.toUpperCase()).join(', ')} (${s.nonGravLaw})` : 'gravity only'} · epoch{' '}
            {s.epoch ?? 'middle of the arc'} · {s.rejectOutliers ? 'outliers rejected by the χ² rule' : 'no outlier rejection'} · start{' '}
            {s.initialSolutionId ? `from solution #${s.initialSolutionId}` : "by Gauss's method"} · {stationWeightsText(s.stationWeights) ?? 'reported uncertainties'} ·
            {s.ut1MinusUtcSeconds ? ` UT1 − UTC ${String(s.ut1MinusUtcSeconds).replace('-', '−')} s ·` : ''} requested {formatUtc(fit.createdAt)}
            {fit.createdByName ? ` by ${fit.createdByName}` : ''}
          </p>
        }
        actions={
          !isFitFinished(fit.status) && access.cancelFit ? (
            <Button variant="danger-outline" busy={cancel.isPending} onClick={() => cancel.mutate()}>Cancel the fit</Button>
          ) : result ? (
            <>
              <Button variant="secondary" onClick={() => downloadJson(fit)}>Download JSON</Button>
              {access.adopt && !fit.adopted && <Button onClick={() => setAdopting(true)}>Adopt a fit…</Button>}
            </>
          ) : undefined
        }
      />
      <div className="space-y-8">
        <Card>
          <div className="mb-3 flex flex-wrap items-center gap-3">
            <FitStatusBadge status={fit.status} />
            {fit.startedAt && <span className="text-sm text-ink-soft">started {formatUtc(fit.startedAt)}</span>}
            {fit.finishedAt && <span className="text-sm text-ink-soft">· finished {formatUtc(fit.finishedAt)}</span>}
          </div>
          {!isFitFinished(fit.status) && <FitProgress fit={fit} />}
          {fit.status === 'failed' && <Notice tone="error" title="The fit failed">{fit.error}</Notice>}
          {fit.status === 'cancelled' && <Notice tone="caution" title="The fit was cancelled">{fit.error}</Notice>}
          {cancel.isError && <Notice tone="error" className="mt-3">{errorMessage(cancel.error)}</Notice>}
          {fit.adopted && (
            <Notice tone="success" title={`Adopted as solution version ${fit.adopted.solutionVersion}`} className="mt-3">
              <p>
                {FIT_LABELS[fit.adopted.which]} fit, {formatUtc(fit.adopted.at)}{fit.adopted.byName ? ` by ${fit.adopted.byName}` : ''}: “{fit.adopted.reason}” ·{' '}
                <Link to={`/objects/${fit.objectId}?version=${fit.adopted.solutionVersion}`}>Open version {fit.adopted.solutionVersion}</Link>
              </p>
            </Notice>
          )}
        </Card>

        {result && (
          <>
            <p className="text-sm text-ink-soft" data-testid="arc">
              Arc {result.arc.firstUtc.slice(0, 10)} to {result.arc.lastUtc.slice(0, 10)} ({result.arc.days.toFixed(1)} days), {result.arc.observations} observations from{' '}
              {result.arc.stations.join(', ')}
              {result.preliminary
                ? ` · preliminary orbit: ${result.preliminary.method === 'gauss' ? `Gauss's method on observations ${result.preliminary.observationIndices.map((i) => i + 1).join(', ')}${result.preliminary.rootsAu.length > 1 ? ` (${result.preliminary.rootsAu.length} admissible roots, r₂ = ${result.preliminary.chosenRootAu?.toFixed(4)} AU kept)` : ''}` : 'a stored solution'}`
                : ''}
            </p>
            {result.warnings.length > 0 && (
              <Notice tone="caution" title="Warnings">
                <ul className="list-disc pl-5">{result.warnings.map((w, k) => <li key={k}>{w}</li>)}</ul>
              </Notice>
            )}
            {result.nonGrav && result.comparison && <ComparisonView gravityOnly={result.gravityOnly} nonGrav={result.nonGrav} comparison={result.comparison} />}
            <ResidualPlots result={result} excluded={excluded} fileStem={`tocsin-fit-${fit.id}`} />
            <FitSummary fits={fits} />
            <StationStatistics fits={fits} />
            <ResidualTable
              fits={fits}
              excluded={excluded}
              fileStem={`tocsin-fit-${fit.id}`}
              exclusion={access.exclude ? { objectId: fit.objectId, observationIds: fit.observationIds ?? [], excludedIds } : undefined}
            />
            <section aria-labelledby="fit-provenance-heading">
              <h2 id="fit-provenance-heading" className="mb-2 text-lg font-semibold">Provenance</h2>
              <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="font-medium">Engine</dt><dd className="text-ink-soft">{result.engineVersion}</dd>
                <dt className="font-medium">Observations SHA-256</dt><dd className="break-all text-ink-soft">{result.observationsSha256}</dd>
                <dt className="font-medium">Observatories SHA-256</dt><dd className="break-all text-ink-soft">{result.observatoriesSha256}</dd>
                <dt className="font-medium">Iterations</dt>
                <dd className="text-ink-soft">{fits.map((f) => `${FIT_LABELS[f.label]}: ${f.iterations.map((i) => i.rmsNormalized.toFixed(3)).join(' → ')}`).join(' · ')}</dd>
              </dl>
            </section>
            {access.adopt && !fit.adopted && <AdoptDialog fit={fit} result={result} open={adopting} onClose={() => setAdopting(false)} />}
          </>
        )}
      </div>
    </div>
  );
}
