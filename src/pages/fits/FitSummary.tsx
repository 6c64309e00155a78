// The fit summary: one column per fit (gravity-only, and with non-gravitational terms when requested): status,
// iterations, normalised and unweighted RMS, chi-square per degree of freedom, observations used, epoch, the
// elements with 1-sigma, A_k with sigma and S/N, unbound significance, the predicted encounter uncertainty and, for
// near-parabolic and unbound fits, the original barycentric orbit.
import type { ReactNode } from 'react';
import type { FitResult, NonGravTerm } from '../../../shared/schemas/od';
import { CAUTION_TEXT } from '../../components/CautionFooter';
import { formatNumber, formatUtc } from '../objects/format';
import { formatUnboundSignificance } from '../../../shared/format';
import { ELEMENT_LABELS, FIT_LABELS, fixed, formatTdbDays } from './format';

const STATUS_TEXT: Record<FitResult['status'], string> = { converged: 'Converged', 'not-converged': 'Did not converge', failed: 'Failed' };

/** sigma of parameter `name` from the fit's covariance, or null. */
export function parameterSigma(fit: FitResult, name: FitResult['parameters'][number]): number | null {
  const i = fit.parameters.indexOf(name);
  if (i < 0 || !fit.covariance) return null;
  const v = fit.covariance[i]?.[i];
  return v !== undefined && v >= 0 ? Math.sqrt(v) : null;
}

type Row = { label: string; cells: (f: FitResult) => ReactNode; testId?: string };

function valueSigma(v: number | null | undefined, s: number | null | undefined, digits: number): string {
  if (v === null || v === undefined) return '—';
  return `${formatNumber(v, digits)}${s !== null && s !== undefined ? ` ± ${formatNumber(s, 3)}` : ''}`;
}

// Original (pre-entry) barycentric orbit of near-parabolic and unbound fits (engine od/originalOrbit.ts): shown when a
// fit has one; '—' for a fit without (osculating e ≤ 0.98 or not computed).
const originalRows: Row[] = [
  {
    label: 'Original 1/a (barycentric) [1/AU]',
    testId: 'original-inverse-a-row',
    cells: (f) => {
      const o = f.originalOrbit;
      if (!o) return '—';
      const s = o.unboundSignificance;
      return `${valueSigma(o.inverseSemiMajorAxisPerAu, o.inverseSemiMajorAxisSigmaPerAu, 6)}${s !== null ? ` (${s > 0 ? 'unbound' : 'bound'} at ${formatNumber(Math.abs(s), 3)}σ)` : ''}`;
    },
  },
  { label: 'Original v∞ [km/s]', testId: 'original-vinf-row', cells: (f) => (f.originalOrbit ? fixed(f.originalOrbit.vInfinityKmS, 3) : '—') },
  {
    label: 'Original orbit taken at',
    testId: 'original-where-row',
    cells: (f) => {
      const o = f.originalOrbit;
      if (!o) return '—';
      const when = `${o.tdbCalendar.slice(0, 10)} TDB, ${o.yearsBack.toFixed(1)} years back`;
      if (o.stop === 'distance') return `${formatNumber(o.distanceAu, 4)} AU from the Sun, ${when}`;
      return `not reached ${formatNumber(o.distanceAu, 4)} AU: ${o.stop === 'aphelion' ? 'bound, aphelion' : 'time limit'} at ${formatNumber(o.heliocentricDistanceAu, 4)} AU, ${when}`;
    },
  },
];

export function FitSummary({ fits }: { fits: FitResult[] }) {
  const terms = [...new Set(fits.flatMap((f) => f.parameters.filter((p): p is NonGravTerm => p === 'a1' || p === 'a2' || p === 'a3')))];
  const hasOriginal = fits.some((f) => f.originalOrbit);
  const rows: Row[] = [
    { label: 'Status', testId: 'fit-status-row', cells: (f) => <span className={f.status === 'converged' ? 'text-ok-700' : 'font-medium text-danger-700'}>{STATUS_TEXT[f.status]}{f.message ? ` · ${f.message}` : ''}</span> },
    { label: 'Iterations', cells: (f) => f.iterations.length },
    { label: 'Normalised RMS', testId: 'rms-normalised-row', cells: (f) => fixed(f.rmsNormalized, 3) },
    { label: 'RMS (″, unweighted)', testId: 'rms-row', cells: (f) => fixed(f.rmsArcsec, 3) },
    { label: 'χ² / degrees of freedom', cells: (f) => `${fixed(f.chiSquare, 1)} / ${f.degreesOfFreedom} = ${f.degreesOfFreedom > 0 ? (f.chiSquare / f.degreesOfFreedom).toFixed(2) : '—'}` },
    { label: 'Observations used / total', cells: (f) => `${f.observationsUsed} / ${f.observationsTotal} (${f.observationsTotal - f.observationsUsed} rejected)` },
    { label: 'Epoch', cells: (f) => `JD ${f.epochTdbJd.toFixed(1)} TDB (${formatTdbDays(f.epochTdbDays).slice(0, 10)})` },
    ...Object.entries(ELEMENT_LABELS).map(([key, meta]): Row => ({
      label: `${meta.label}${meta.unit && key !== 'perihelionTimeTdbDays' ? ` [${meta.unit}]` : ''}`,
      cells: (f) => {
        const e = f.elements?.[key as keyof NonNullable<FitResult['elements']>];
        if (!e) return '—';
        if (key === 'perihelionTimeTdbDays') return `${formatTdbDays(e.value)}${e.sigma !== null ? ` ± ${formatNumber(e.sigma, 3)} d` : ''}`;
        return valueSigma(e.value, e.sigma, meta.digits);
      },
    })),
    ...terms.map((t): Row => ({
      label: `${t.toUpperCase()} [AU/d²] (S/N)`,
      cells: (f) => {
        if (!f.nonGrav || !f.parameters.includes(t)) return 'not fitted';
        const v = f.nonGrav[t];
        const s = parameterSigma(f, t);
        return `${valueSigma(v, s, 4)}${s ? ` (${(Math.abs(v) / s).toFixed(1)})` : ''}`;
      },
    })),
    { label: 'Unbound significance (e − 1)/σe', cells: (f) => formatUnboundSignificance(f.unboundSignificance) },
    { label: 'v∞ [km/s]', cells: (f) => fixed(f.vInfinityKmS, 3) },
    {
      label: 'Closest Earth approach after the arc',
      cells: (f) => (f.encounter ? `${formatUtc(f.encounter.closeApproachUtc)} · ${formatNumber(f.encounter.distanceKm, 5)} km ± ${formatNumber(f.encounter.distanceSigmaKm, 3)} km` : '—'),
    },
    { label: 'Position 1σ there, largest axis [km]', cells: (f) => (f.encounter ? formatNumber(f.encounter.positionSigmaMaxKm, 3) : '—') },
    { label: 'Approach time 1σ [min]', cells: (f) => (f.encounter ? formatNumber(f.encounter.timeSigmaMin, 3) : '—') },
    ...(hasOriginal ? originalRows : []),
  ];
  return (
    <section aria-labelledby="fit-summary-heading">
      <h2 id="fit-summary-heading" className="mb-3 text-lg font-semibold">Fit summary</h2>
      <div className="overflow-x-auto rounded-lg border border-rule bg-white">
        <table className="w-full min-w-[44rem] text-left text-sm tabular-nums" data-testid="fit-summary">
          <thead className="bg-accent-50">
            <tr>
              <th scope="col" className="px-3 py-2"><span className="sr-only">Quantity</span></th>
              {fits.map((f) => <th key={f.label} scope="col" className="px-3 py-2">{FIT_LABELS[f.label]}</th>)}
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.label} className="border-t border-rule" data-testid={r.testId}>
                <th scope="row" className="px-3 py-1.5 font-medium">{r.label}</th>
                {fits.map((f) => <td key={f.label} className="px-3 py-1.5">{r.cells(f)}</td>)}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-2 text-xs text-ink-soft">
        Elements: heliocentric, J2000 ecliptic, osculating at the epoch; 1σ from the fit covariance. Encounter figures are the linear propagation of that
        covariance. {CAUTION_TEXT}
      </p>
      {hasOriginal && (
        <p className="mt-1 text-xs text-ink-soft" data-testid="original-orbit-note">
          Original orbit: the fit integrated back (planets and the fitted non-gravitational terms) to the distance shown, as barycentric two-body
          elements (GM of the Sun and planets); S = −(1/a)/σ. An interstellar candidate needs an original orbit hyperbolic at high
          significance (S ≫ 3) in both fits and under other outlier treatment, and v∞ well above the ≲0.3–1 km/s that planetary perturbations
          and outgassing give Oort-cloud comets. The judgement is the analyst&apos;s.
        </p>
      )}
    </section>
  );
}
