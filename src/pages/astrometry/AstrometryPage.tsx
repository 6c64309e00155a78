// The astrometry of one object: upload ADES PSV files, the batches received, and every stored observation (batch,
// station, UTC time, RA/Dec, quoted uncertainties) with the analyst's exclusion (kept out of every fit, with the
// reason recorded). Orbit fits of this astrometry are one link away.
import { useMemo, useState } from 'react';
import { Link, useParams } from 'react-router';
import type { StoredObservation } from '../../../shared/schemas/odApi';
import { useAstrometry, useExcludeObservation } from '../../api/od';
import { useObject } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, ErrorState, LoadingState, Notice, PageHeader, SelectField, buttonClass, errorMessage } from '../../components/ui';
import { formatUtc } from '../objects/format';
import { odAccess } from '../fits/access';
import { formatDec, formatObsTime, formatRa } from './format';
import { ExcludeDialog } from './ExcludeDialog';
import { UploadAstrometryForm } from './UploadAstrometryForm';

const fmtRms = (v: number | null) => (v === null ? '—' : v.toFixed(2));

function ObservationTable({ objectId, observations, canExclude }: { objectId: number; observations: StoredObservation[]; canExclude: boolean }) {
  const exclude = useExcludeObservation(objectId);
  const [station, setStation] = useState('');
  const [batch, setBatch] = useState('');
  const [show, setShow] = useState<'all' | 'included' | 'excluded'>('all');
  const [target, setTarget] = useState<StoredObservation | null>(null);
  const stations = useMemo(() => [...new Set(observations.map((o) => o.stn))].sort(), [observations]);
  const batches = useMemo(() => [...new Set(observations.map((o) => o.batchId))].sort((a, b) => a - b), [observations]);
  const rows = observations
    .filter((o) => (!station || o.stn === station) && (!batch || o.batchId === Number(batch)) && (show === 'all' || (show === 'excluded') === o.excluded))
    .sort((a, b) => a.obsTimeTdbDays - b.obsTimeTdbDays);
  const excludedCount = observations.filter((o) => o.excluded).length;

  return (
    <section aria-labelledby="observations-heading">
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id="observations-heading" className="text-lg font-semibold">Observations</h2>
          <p className="text-sm text-ink-soft">
            {observations.length} stored · {excludedCount} excluded by an analyst · {stations.length} station{stations.length === 1 ? '' : 's'}
          </p>
        </div>
        <div className="flex flex-wrap gap-3">
          <SelectField label="Station" value={station} onChange={(e) => setStation(e.target.value)} className="w-32">
            <option value="">All</option>
            {stations.map((s) => <option key={s} value={s}>{s}</option>)}
          </SelectField>
          <SelectField label="Batch" value={batch} onChange={(e) => setBatch(e.target.value)} className="w-32">
            <option value="">All</option>
            {batches.map((b) => <option key={b} value={b}>#{b}</option>)}
          </SelectField>
          <SelectField label="Show" value={show} onChange={(e) => setShow(e.target.value as typeof show)} className="w-36">
            <option value="all">All</option>
            <option value="included">Included</option>
            <option value="excluded">Excluded</option>
          </SelectField>
        </div>
      </div>
      {exclude.isError && <Notice tone="error" className="mb-3">{errorMessage(exclude.error)}</Notice>}
      <div className="max-h-[36rem] overflow-auto rounded-lg border border-rule bg-white">
        <table className="w-full min-w-[60rem] text-left text-sm" data-testid="observation-table">
          <caption className="sr-only">Stored observations, in time order</caption>
          <thead className="sticky top-0 bg-accent-50">
            <tr>
              <th scope="col" className="px-3 py-2">Time (UTC)</th>
              <th scope="col" className="px-3 py-2">Station</th>
              <th scope="col" className="px-3 py-2">RA (h m s)</th>
              <th scope="col" className="px-3 py-2">Dec (° ′ ″)</th>
              <th scope="col" className="px-3 py-2">σ RA·cos Dec, σ Dec (″)</th>
              <th scope="col" className="px-3 py-2">Mag</th>
              <th scope="col" className="px-3 py-2">Batch · line</th>
              <th scope="col" className="px-3 py-2">In fits</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((o) => (
              <tr key={o.id} className={`border-t border-rule tabular-nums ${o.excluded ? 'bg-paper text-ink-soft' : ''}`} data-testid={`observation-${o.id}`}>
                <td className="px-3 py-1.5 whitespace-nowrap">{formatObsTime(o.obsTime)}</td>
                <td className="px-3 py-1.5">{o.stn}</td>
                <td className="px-3 py-1.5 whitespace-nowrap font-mono text-xs">{formatRa(o.raDeg)}</td>
                <td className="px-3 py-1.5 whitespace-nowrap font-mono text-xs">{formatDec(o.decDeg)}</td>
                <td className="px-3 py-1.5">{fmtRms(o.rmsRaArcsec)}, {fmtRms(o.rmsDecArcsec)}{o.rmsCorr !== null ? ` (ρ ${o.rmsCorr.toFixed(2)})` : ''}</td>
                <td className="px-3 py-1.5">{o.mag === null ? '—' : `${o.mag.toFixed(1)}${o.band ? ` ${o.band}` : ''}`}</td>
                <td className="px-3 py-1.5">#{o.batchId} · {o.line}</td>
                <td className="px-3 py-1.5">
                  <div className="flex items-center gap-2">
                    <span className={o.excluded ? 'font-medium text-danger-700' : ''}>{o.excluded ? 'Excluded' : 'Used'}</span>
                    {canExclude && (
                      <Button
                        variant="quiet"
                        className="!px-2 !py-0.5 text-xs"
                        aria-label={`${o.excluded ? 'Include' : 'Exclude'} ${o.stn} ${formatObsTime(o.obsTime)}`}
                        busy={exclude.isPending && exclude.variables?.obsId === o.id}
                        onClick={() => (o.excluded ? exclude.mutate({ obsId: o.id, excluded: false }) : setTarget(o))}
                      >
                        {o.excluded ? 'Include again' : 'Exclude'}
                      </Button>
                    )}
                  </div>
                  {o.excluded && o.excludedReason && <p className="mt-0.5 max-w-56 text-xs">“{o.excludedReason}”</p>}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        {rows.length === 0 && <p className="p-4 text-ink-soft">No observation matches the filters.</p>}
      </div>
      <ExcludeDialog objectId={objectId} target={target} onClose={() => setTarget(null)} />
    </section>
  );
}

export function AstrometryPage() {
  const id = Number(useParams().id);
  const access = odAccess(useAppAbility());
  const object = useObject(id);
  const astrometry = useAstrometry(id);
  const designation = object.data?.designation ?? `object #${id}`;
  return (
    <div>
      <title>{`Astrometry · ${designation} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/objects/${id}`}>← {designation}</Link>
      </p>
      <PageHeader
        title={`Astrometry of ${designation}`}
        intro={<p>Optical positions received for this object, per file. Excluded observations are kept but left out of every fit.</p>}
        actions={<Link to={`/objects/${id}/fits`} className={buttonClass('secondary')}>Orbit fits</Link>}
      />
      <div className="space-y-8">
        {object.isError && <ErrorState error={object.error} onRetry={() => void object.refetch()} title="The object could not be loaded" />}
        {access.upload && <UploadAstrometryForm objectId={id} />}
        {astrometry.isPending ? (
          <LoadingState label="Loading the astrometry…" />
        ) : astrometry.isError ? (
          <ErrorState error={astrometry.error} onRetry={() => void astrometry.refetch()} title="The astrometry could not be loaded" />
        ) : (
          <>
            <section aria-labelledby="batches-heading">
              <h2 id="batches-heading" className="mb-3 text-lg font-semibold">Files received</h2>
              {astrometry.data.batches.length === 0 ? (
                <p className="text-ink-soft">No astrometry yet.</p>
              ) : (
                <div className="overflow-x-auto rounded-lg border border-rule bg-white">
                  <table className="w-full min-w-[40rem] text-left text-sm" data-testid="batch-table">
                    <thead className="bg-accent-50">
                      <tr>
                        <th scope="col" className="px-3 py-2">Batch</th>
                        <th scope="col" className="px-3 py-2">File</th>
                        <th scope="col" className="px-3 py-2">Observations</th>
                        <th scope="col" className="px-3 py-2">Duplicates skipped</th>
                        <th scope="col" className="px-3 py-2">Received</th>
                        <th scope="col" className="px-3 py-2">SHA-256</th>
                      </tr>
                    </thead>
                    <tbody>
                      {astrometry.data.batches.map((b) => (
                        <tr key={b.id} className="border-t border-rule tabular-nums">
                          <td className="px-3 py-2 font-semibold">#{b.id}</td>
                          <td className="px-3 py-2">{b.fileName ?? 'pasted text'}</td>
                          <td className="px-3 py-2">{b.observationCount}</td>
                          <td className="px-3 py-2">{b.duplicatesSkipped}</td>
                          <td className="px-3 py-2">{formatUtc(b.createdAt)}{b.createdByName ? ` · ${b.createdByName}` : ''}</td>
                          <td className="px-3 py-2 font-mono text-xs" title={b.sha256}>{b.sha256.slice(0, 12)}…</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              )}
            </section>
            {astrometry.data.observations.length > 0 && <ObservationTable objectId={id} observations={astrometry.data.observations} canExclude={access.exclude} />}
          </>
        )}
      </div>
    </div>
  );
}
