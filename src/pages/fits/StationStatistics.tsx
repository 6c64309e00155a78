// Residuals by observatory, one table per fit: how many observations each station has in the fit, their RMS and
// normalised RMS, whether the stated uncertainties are borne out (chi-square test), and the mean offset per
// coordinate with its significance (server/engine/od/stationStatistics.ts). Helps decide which station to reweight.
import type { FitResult, StationStatistics as Stats } from '../../../shared/schemas/od';
import { FIT_LABELS, fixed, formatP } from './format';

const WEIGHTS_TEXT: Record<Stats['weights'], string> = {
  consistent: 'consistent',
  understated: 'understated',
  overstated: 'overstated',
  'too-few': 'too few to judge',
};

function offsetText(arcsec: number | null, sigma: number | null): string {
  if (arcsec === null || sigma === null) return '—';
  return `${arcsec >= 0 ? '+' : '−'}${Math.abs(arcsec).toFixed(3)} (${Math.abs(sigma).toFixed(1)}σ)`;
}

function StationTable({ fit }: { fit: FitResult }) {
  const stations = fit.stations ?? [];
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-white">
      <table className="w-full min-w-[36rem] text-left text-sm tabular-nums" data-testid={`station-statistics-${fit.label}`}>
        <caption className="px-3 pt-2 text-left text-sm font-semibold">{FIT_LABELS[fit.label]}</caption>
        <thead className="bg-accent-50">
          <tr>
            <th scope="col" className="px-3 py-2">Station</th>
            <th scope="col" className="px-3 py-2">Used (not used)</th>
            <th scope="col" className="px-3 py-2">RMS (″)</th>
            <th scope="col" className="px-3 py-2">Normalised RMS</th>
            <th scope="col" className="px-3 py-2">Stated uncertainties</th>
            <th scope="col" className="px-3 py-2">Mean RA·cos δ (″)</th>
            <th scope="col" className="px-3 py-2">Mean Dec (″)</th>
          </tr>
        </thead>
        <tbody>
          {stations.map((s) => {
            const flagged = s.weights === 'understated' || s.weights === 'overstated';
            return (
              <tr key={s.stn} className="border-t border-rule" data-testid={`station-row-${fit.label}-${s.stn}`}>
                <th scope="row" className="px-3 py-1.5 font-medium">{s.stn}</th>
                <td className="px-3 py-1.5">{s.used}{s.notUsed > 0 ? ` (${s.notUsed})` : ''}</td>
                <td className="px-3 py-1.5">{fixed(s.rmsArcsec, 3)}</td>
                <td className="px-3 py-1.5">{fixed(s.rmsNormalized, 2)}</td>
                <td className={`px-3 py-1.5 ${flagged ? 'font-medium text-signal-700' : ''}`} data-testid="station-weights">
                  {WEIGHTS_TEXT[s.weights]}
                  {s.weightsPValue !== null && flagged ? ` (p = ${formatP(s.weightsPValue)})` : ''}
                </td>
                <td className="px-3 py-1.5">{offsetText(s.offsetRaCosDecArcsec, s.offsetRaCosDecSigma)}</td>
                <td className="px-3 py-1.5">{offsetText(s.offsetDecArcsec, s.offsetDecSigma)}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

export function StationStatistics({ fits }: { fits: FitResult[] }) {
  const withStats = fits.filter((f) => f.stations && f.stations.length > 0);
  if (withStats.length === 0) return null;
  return (
    <section aria-labelledby="station-statistics-heading">
      <h2 id="station-statistics-heading" className="mb-1 text-lg font-semibold">Residuals by observatory</h2>
      <p className="mb-3 max-w-3xl text-sm text-ink-soft">
        Used observations only. Stated uncertainties are tested with χ² of the residuals over their stated σ (before the
        nightly de-weighting) against 2n degrees of freedom; they are called understated or overstated when the two-sided
        p-value is below 0.001. A station flagged here is a candidate for reweighting in the next fit. Mean offsets are
        weighted means with their significance.
      </p>
      <div className="grid gap-4">
        {withStats.map((f) => <StationTable key={f.label} fit={f} />)}
      </div>
    </section>
  );
}
