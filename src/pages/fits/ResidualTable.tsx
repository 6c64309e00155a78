// The residual table of one fit: station, time, O−C in RA·cos(Dec) and Dec, the weights used, each
// observation's chi-square (2 degrees of freedom, METHODS.md §9.1) and whether the fit used or rejected it.
// Sortable by any column, filtered by station and status.
import { useState } from 'react';
import type { FitResult, Residual } from '../../../shared/schemas/od';
import { downloadBlob } from '../../components/results/download';
import { SelectField } from '../../components/ui';
import { ExcludeDialog, type ExcludeTarget } from '../astrometry/ExcludeDialog';
import { formatObsTime } from '../astrometry/format';
import { FIT_LABELS, residualsCsv } from './format';

type SortKey = 'time' | 'stn' | 'ra' | 'dec' | 'chi' | 'status';
const COLUMNS: { key: SortKey; label: string }[] = [
  { key: 'time', label: 'Time (UTC)' },
  { key: 'stn', label: 'Station' },
  { key: 'ra', label: 'O−C RA·cos Dec (″)' },
  { key: 'dec', label: 'O−C Dec (″)' },
  { key: 'chi', label: 'χ²' },
  { key: 'status', label: 'Status' },
];

const value = (r: Residual, k: SortKey): number | string =>
  k === 'time' ? r.obsTimeTdbDays : k === 'stn' ? r.stn : k === 'ra' ? r.raCosDecArcsec : k === 'dec' ? r.decArcsec : k === 'chi' ? r.chiSquare : r.status;

/** When the user may exclude observations: the fit's residual.index -> stored observation id, and those excluded now. */
export type ResidualExclusion = { objectId: number; observationIds: number[]; excludedIds: Set<number> };

export function ResidualTable({ fits, excluded, fileStem, exclusion }: { fits: FitResult[]; excluded?: (r: Residual) => boolean; fileStem: string; exclusion?: ResidualExclusion }) {
  const [target, setTarget] = useState<ExcludeTarget | null>(null);
  const [which, setWhich] = useState(fits[fits.length - 1].label);
  const [station, setStation] = useState('');
  const [status, setStatus] = useState('');
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: 'time', dir: 1 });
  const fit = fits.find((f) => f.label === which) ?? fits[0];
  const stations = [...new Set(fit.residuals.map((r) => r.stn))].sort();
  const rows = fit.residuals
    .filter((r) => (!station || r.stn === station) && (!status || r.status === status))
    .sort((a, b) => {
      const va = value(a, sort.key), vb = value(b, sort.key);
      const c = typeof va === 'number' && typeof vb === 'number' ? va - vb : String(va).localeCompare(String(vb));
      return (c || a.obsTimeTdbDays - b.obsTimeTdbDays) * sort.dir;
    });
  const clickSort = (key: SortKey) => setSort((s) => (s.key === key ? { key, dir: s.dir === 1 ? -1 : 1 } : { key, dir: key === 'chi' ? -1 : 1 }));

  return (
    <section aria-labelledby="residual-table-heading">
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id="residual-table-heading" className="text-lg font-semibold">Residual table</h2>
          <p className="text-sm text-ink-soft">
            {rows.length} of {fit.residuals.length} observations shown · {fit.residuals.filter((r) => r.status === 'rejected').length} rejected by the χ² rule ·{' '}
            <button type="button" className="text-accent-700 underline" onClick={() => downloadBlob(`${fileStem}-${fit.label}-residuals.csv`, new Blob([residualsCsv(rows)], { type: 'text/csv' }))}>
              Download these rows (CSV)
            </button>
          </p>
        </div>
        <div className="flex flex-wrap gap-3">
          {fits.length > 1 && (
            <SelectField label="Fit" value={which} onChange={(e) => setWhich(e.target.value as FitResult['label'])} className="w-80">
              {fits.map((f) => <option key={f.label} value={f.label}>{FIT_LABELS[f.label]}</option>)}
            </SelectField>
          )}
          <SelectField label="Station" value={station} onChange={(e) => setStation(e.target.value)} className="w-32">
            <option value="">All</option>
            {stations.map((s) => <option key={s} value={s}>{s}</option>)}
          </SelectField>
          <SelectField label="Status" value={status} onChange={(e) => setStatus(e.target.value)} className="w-36">
            <option value="">All</option>
            <option value="used">Used</option>
            <option value="rejected">Rejected</option>
          </SelectField>
        </div>
      </div>
      <div className="max-h-[32rem] overflow-auto rounded-lg border border-rule bg-white">
        <table className="w-full min-w-[52rem] text-left text-sm" data-testid="residual-table">
          <caption className="sr-only">Residuals of the {FIT_LABELS[fit.label].toLowerCase()} fit</caption>
          <thead className="sticky top-0 bg-accent-50">
            <tr>
              {COLUMNS.map((c) => (
                <th key={c.key} scope="col" className="px-3 py-2" aria-sort={sort.key === c.key ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none'}>
                  <button type="button" className="inline-flex items-center gap-1 font-semibold" onClick={() => clickSort(c.key)}>
                    {c.label}
                    <span aria-hidden="true" className="text-ink-soft">{sort.key === c.key ? (sort.dir === 1 ? '▲' : '▼') : '↕'}</span>
                  </button>
                </th>
              ))}
              <th scope="col" className="px-3 py-2">σ RA, σ Dec (″)</th>
              <th scope="col" className="px-3 py-2">Line</th>
              {exclusion && <th scope="col" className="px-3 py-2"><span className="sr-only">Exclude</span></th>}
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => {
              const ex = excluded?.(r) ?? false;
              return (
                <tr key={r.index} className={`border-t border-rule tabular-nums ${r.status === 'rejected' ? 'bg-danger-50/60' : ''} ${ex ? 'text-ink-soft' : ''}`}>
                  <td className="px-3 py-1.5 whitespace-nowrap">{formatObsTime(r.obsTime)}</td>
                  <td className="px-3 py-1.5">{r.stn}</td>
                  <td className="px-3 py-1.5 text-right">{r.raCosDecArcsec.toFixed(3)}</td>
                  <td className="px-3 py-1.5 text-right">{r.decArcsec.toFixed(3)}</td>
                  <td className="px-3 py-1.5 text-right">{r.chiSquare.toFixed(2)}</td>
                  <td className="px-3 py-1.5">
                    {r.status === 'rejected' ? <span className="font-medium text-danger-700">Rejected</span> : 'Used'}
                    {ex && <span className="ml-1 text-xs">(excluded since)</span>}
                  </td>
                  <td className="px-3 py-1.5">{r.sigmaRaArcsec.toFixed(2)}, {r.sigmaDecArcsec.toFixed(2)}</td>
                  <td className="px-3 py-1.5">{r.line}</td>
                  {exclusion && (
                    <td className="px-3 py-1.5">
                      {(() => {
                        const id = exclusion.observationIds[r.index];
                        if (id === undefined || exclusion.excludedIds.has(id)) return null;
                        return (
                          <button type="button" className="text-xs text-accent-700 underline" aria-label={`Exclude ${r.stn} ${formatObsTime(r.obsTime)} from later fits`} onClick={() => setTarget({ id, stn: r.stn, obsTime: r.obsTime })}>
                            Exclude
                          </button>
                        );
                      })()}
                    </td>
                  )}
                </tr>
              );
            })}
          </tbody>
        </table>
        {rows.length === 0 && <p className="p-4 text-ink-soft">No residual matches the filters.</p>}
      </div>
      {exclusion && <ExcludeDialog objectId={exclusion.objectId} target={target} onClose={() => setTarget(null)} note="This fit keeps it: start a new fit to see the effect." />}
    </section>
  );
}
