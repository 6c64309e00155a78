// The orbit fits of one object: start a fit (analysts, and reviewers to check one) and the list of fit jobs with
// their status (polled while any is unfinished) and, once adopted, the solution version they became.
import { Link, useParams } from 'react-router';
import { useAstrometry, useObjectFits } from '../../api/od';
import { useObject, useSolutions } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { ErrorState, LoadingState, PageHeader, buttonClass } from '../../components/ui';
import { QueryTable } from '../../components/QueryTable';
import { formatUtc } from '../objects/format';
import { odAccess } from './access';
import { FIT_LABELS } from './format';
import { FitStatusBadge, fitProgressText } from './FitStatus';
import { StartFitForm } from './StartFitForm';

export function ObjectFitsPage() {
  const id = Number(useParams().id);
  const access = odAccess(useAppAbility());
  const object = useObject(id);
  const solutions = useSolutions(id);
  const astrometry = useAstrometry(id);
  const fits = useObjectFits(id);
  const designation = object.data?.designation ?? `object #${id}`;
  const usable = astrometry.data ? astrometry.data.observations.filter((o) => !o.excluded).length : null;
  return (
    <div>
      <title>{`Orbit fits · ${designation} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/objects/${id}`}>← {designation}</Link>
      </p>
      <PageHeader
        title={`Orbit fits of ${designation}`}
        intro={<p>Least-squares fits of the object's astrometry, gravity-only and with non-gravitational terms, and which one became a solution version.</p>}
        actions={<Link to={`/objects/${id}/astrometry`} className={buttonClass('secondary')}>Astrometry</Link>}
      />
      <div className="space-y-8">
        {object.isError && <ErrorState error={object.error} onRetry={() => void object.refetch()} title="The object could not be loaded" />}
        {access.startFit && (
          astrometry.isError ? (
            <ErrorState error={astrometry.error} onRetry={() => void astrometry.refetch()} title="The astrometry could not be loaded" />
          ) : (
            <StartFitForm objectId={id} solutions={solutions.data ?? []} observationCount={usable} lastFitId={lastDoneFitId(fits.data)} />
          )
        )}
        <section aria-labelledby="fit-list-heading">
          <h2 id="fit-list-heading" className="mb-3 text-lg font-semibold">Fits</h2>
          <QueryTable
            list={fits}
            loadingLabel="Loading fits…"
            errorTitle="The fits could not be loaded"
            empty="No fit yet."
            tableClassName="min-w-[48rem]"
            testId="fit-list"
            columns={['Fit', 'Status', 'Model', 'Observations', 'Requested', 'Adopted']}
            row={(f) => (
              <tr key={f.id} className="border-t border-rule tabular-nums" data-testid={`fit-row-${f.id}`}>
                <td className="px-3 py-2 font-semibold"><Link to={`/fits/${f.id}`}>Fit #{f.id}</Link></td>
                <td className="px-3 py-2">
                  <FitStatusBadge status={f.status} /> <span className="text-xs text-ink-soft">{fitProgressText(f)}</span>
                  {f.status === 'failed' && f.error && <p className="mt-1 max-w-sm text-xs text-danger-700">{f.error}</p>}
                </td>
                <td className="px-3 py-2">
                  {f.settings.nonGravTerms.length === 0 ? 'Gravity only' : `Gravity only vs ${f.settings.nonGravTerms.map((t) => t.toUpperCase()).join(', ')}`}
                  {f.settings.epoch ? ` · epoch ${f.settings.epoch}` : ''}
                </td>
                <td className="px-3 py-2">{f.observationCount}</td>
                <td className="px-3 py-2">{formatUtc(f.createdAt)}{f.createdByName ? ` · ${f.createdByName}` : ''}</td>
                <td className="px-3 py-2">
                  {f.adopted ? (
                    <Link to={`/objects/${f.objectId}?version=${f.adopted.solutionVersion}`}>v{f.adopted.solutionVersion} ({FIT_LABELS[f.adopted.which].toLowerCase()})</Link>
                  ) : (
                    '—'
                  )}
                </td>
              </tr>
            )}
          />
        </section>
      </div>
    </div>
  );
}

/** The newest finished fit with a result (its residuals by observatory guide the reweighting), or null. */
function lastDoneFitId(fits: readonly { id: number; status: string }[] | undefined): number | null {
  const done = (fits ?? []).filter((f) => f.status === 'done').map((f) => f.id);
  return done.length > 0 ? Math.max(...done) : null;
}
