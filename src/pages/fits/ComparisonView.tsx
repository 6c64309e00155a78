// The comparison of the gravity-only fit and the fit with non-gravitational terms (METHODS.md §9.6): fit quality
// side by side, the likelihood-ratio test of the added parameters (delta chi-square, p-value, Gaussian sigma),
// A_k / sigma_k, each element's 1-sigma in both fits and their ratio, the trend left in the residuals, and how the
// predicted encounter uncertainty changes; then the engine's verdict sentence. The analyst decides (AdoptDialog).
import type { FitComparison, FitResult } from '../../../shared/schemas/od';
import { CAUTION_TEXT } from '../../components/CautionFooter';
import { Card } from '../../components/ui';
import { formatNumber, formatRatio, formatScientific } from '../objects/format';
import { elementLabel, fixed, formatP } from './format';

/** Encounter distances and sigmas: whole kilometres grouped by thousands (180,015,456), small values to 4 digits. */
const encounterText = (x: number) => (Math.abs(x) >= 1000 ? Math.round(x).toLocaleString('en-US') : formatNumber(x, 4));

/** A significance in sigma: one decimal from 1 up, two significant digits below (0.042 σ, not 0.0 σ). */
const sigmaText = (x: number) => (!Number.isFinite(x) ? '—' : `${Math.abs(x) >= 1 ? x.toFixed(1) : Number(x.toPrecision(2))} σ`);

function Stat({ label, value, testId }: { label: string; value: string; testId?: string }) {
  return (
    <div className="rounded-md border border-rule bg-paper/50 px-3 py-2">
      <dt className="text-xs text-ink-soft">{label}</dt>
      <dd className="text-lg font-semibold tabular-nums" data-testid={testId}>{value}</dd>
    </div>
  );
}

export function ComparisonView({ gravityOnly, nonGrav, comparison }: { gravityOnly: FitResult; nonGrav: FitResult; comparison: FitComparison }) {
  // the same-data gravity-only prediction when the comparison has one (refit on the non-grav fit's observations)
  const g = comparison.gravityOnlyEncounter !== undefined ? comparison.gravityOnlyEncounter : gravityOnly.encounter, n = nonGrav.encounter;
  const k = comparison.addedParameters.length;
  return (
    <Card aria-labelledby="comparison-heading" data-testid="comparison">
      <h2 id="comparison-heading" className="text-lg font-semibold">Gravity only or non-gravitational terms?</h2>
      <p className="mt-1 text-sm text-ink-soft">
        The same observations fitted twice; the second fit adds {comparison.addedParameters.map((t) => t.toUpperCase()).join(', ')} ({k} parameter{k === 1 ? '' : 's'}).
      </p>

      <blockquote className="mt-4 border-l-4 border-accent-700 bg-accent-50 px-4 py-3 text-ink" data-testid="verdict">
        {comparison.verdict}
      </blockquote>

      <div className="mt-5 grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="cmp-quality">
          <h3 id="cmp-quality" className="mb-2 font-semibold">Fit quality</h3>
          <table className="w-full text-sm tabular-nums">
            <thead>
              <tr className="text-left text-ink-soft">
                <th scope="col" className="py-1 pr-3 font-medium"><span className="sr-only">Quantity</span></th>
                <th scope="col" className="py-1 pr-3 font-medium">Gravity only</th>
                <th scope="col" className="py-1 font-medium">Non-grav.</th>
              </tr>
            </thead>
            <tbody>
              <tr className="border-t border-rule"><th scope="row" className="py-1 pr-3 text-left font-medium">RMS (″)</th><td className="py-1 pr-3">{fixed(gravityOnly.rmsArcsec, 3)}</td><td className="py-1">{fixed(nonGrav.rmsArcsec, 3)}</td></tr>
              <tr className="border-t border-rule"><th scope="row" className="py-1 pr-3 text-left font-medium">Normalised RMS</th><td className="py-1 pr-3">{fixed(gravityOnly.rmsNormalized, 3)}</td><td className="py-1">{fixed(nonGrav.rmsNormalized, 3)}</td></tr>
              <tr className="border-t border-rule"><th scope="row" className="py-1 pr-3 text-left font-medium">χ² (dof)</th><td className="py-1 pr-3">{fixed(gravityOnly.chiSquare, 1)} ({gravityOnly.degreesOfFreedom})</td><td className="py-1">{fixed(nonGrav.chiSquare, 1)} ({nonGrav.degreesOfFreedom})</td></tr>
              <tr className="border-t border-rule"><th scope="row" className="py-1 pr-3 text-left font-medium">Used / total</th><td className="py-1 pr-3">{gravityOnly.observationsUsed} / {gravityOnly.observationsTotal}</td><td className="py-1">{nonGrav.observationsUsed} / {nonGrav.observationsTotal}</td></tr>
              <tr className="border-t border-rule"><th scope="row" className="py-1 pr-3 text-left font-medium">Residual trend</th><td className="py-1 pr-3">{sigmaText(comparison.residualTrend.gravityOnlySigma)}</td><td className="py-1">{sigmaText(comparison.residualTrend.nonGravSigma)}</td></tr>
            </tbody>
          </table>
          <p className="mt-2 text-xs text-ink-soft">Trend: {comparison.residualTrend.description}</p>
        </section>

        <section aria-labelledby="cmp-test">
          <h3 id="cmp-test" className="mb-2 font-semibold">Do the added terms earn their place?</h3>
          <dl className="grid grid-cols-3 gap-2">
            <Stat label="Δχ²" value={fixed(comparison.deltaChiSquare, 1)} testId="delta-chi-square" />
            <Stat label={`p-value (χ², ${k} dof)`} value={formatP(comparison.pValue)} testId="p-value" />
            <Stat label="Significance" value={sigmaText(comparison.significanceSigma)} testId="significance" />
          </dl>
          {comparison.observationsCompared !== undefined && (
            <p className="mt-2 text-xs text-ink-soft" data-testid="delta-chi-square-set">
              Δχ² over the {comparison.observationsCompared} observations{' '}
              {comparison.gravityOnlyRefitted
                ? 'the non-gravitational fit uses; the gravity-only fit had rejected some of them and was refitted to exactly this set, so both models are fitted to the same data.'
                : 'both fits use.'}
            </p>
          )}
          <table className="mt-3 w-full text-sm tabular-nums">
            <thead>
              <tr className="text-left text-ink-soft">
                <th scope="col" className="py-1 pr-3 font-medium">Term</th>
                <th scope="col" className="py-1 pr-3 font-medium">Value [AU/d²]</th>
                <th scope="col" className="py-1 pr-3 font-medium">σ</th>
                <th scope="col" className="py-1 font-medium">A/σ</th>
              </tr>
            </thead>
            <tbody>
              {comparison.parameterSignificance.map((p) => (
                <tr key={p.term} className="border-t border-rule" data-testid={`significance-${p.term}`}>
                  <th scope="row" className="py-1 pr-3 text-left font-medium">{p.term.toUpperCase()}</th>
                  <td className="py-1 pr-3">{formatNumber(p.valueAuD2, 4)}</td>
                  <td className="py-1 pr-3">{formatNumber(p.sigmaAuD2, 3)}</td>
                  <td className="py-1">{fixed(p.signalToNoise, 1)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>

        <section aria-labelledby="cmp-elements">
          <h3 id="cmp-elements" className="mb-2 font-semibold">What the added terms cost: element 1σ</h3>
          <table className="w-full text-sm tabular-nums">
            <thead>
              <tr className="text-left text-ink-soft">
                <th scope="col" className="py-1 pr-3 font-medium">Element</th>
                <th scope="col" className="py-1 pr-3 font-medium">Gravity only</th>
                <th scope="col" className="py-1 pr-3 font-medium">Non-grav.</th>
                <th scope="col" className="py-1 font-medium">Ratio</th>
              </tr>
            </thead>
            <tbody>
              {comparison.elementSigmas.map((e) => (
                <tr key={e.element} className="border-t border-rule">
                  <th scope="row" className="py-1 pr-3 text-left font-medium">{elementLabel(e.element)}</th>
                  <td className="py-1 pr-3">{formatScientific(e.gravityOnly, 3)}</td>
                  <td className="py-1 pr-3">{formatScientific(e.nonGrav, 3)}</td>
                  <td className="py-1">{formatRatio(e.ratio)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {comparison.gravityOnlyRefitted && (
            <p className="mt-2 text-xs text-ink-soft" data-testid="element-sigmas-refit">
              Gravity-only 1σ here from the gravity-only fit redone on the non-gravitational fit's observations, so
              both columns rest on the same data (the fit summary below shows the gravity-only fit as run).
            </p>
          )}
        </section>

        <section aria-labelledby="cmp-encounter">
          <h3 id="cmp-encounter" className="mb-2 font-semibold">Predicted encounter uncertainty</h3>
          {!g && !n ? (
            <p className="text-sm text-ink-soft">Neither fit predicts an Earth approach within 20 years after the arc.</p>
          ) : (
            <table className="w-full text-sm tabular-nums" data-testid="encounter-comparison">
              <thead>
                <tr className="text-left text-ink-soft">
                  <th scope="col" className="py-1 pr-3 font-medium"><span className="sr-only">Quantity</span></th>
                  <th scope="col" className="py-1 pr-3 font-medium">Gravity only</th>
                  <th scope="col" className="py-1 pr-3 font-medium">Non-grav.</th>
                  <th scope="col" className="py-1 font-medium">Ratio</th>
                </tr>
              </thead>
              <tbody>
                <tr className="border-t border-rule">
                  <th scope="row" className="py-1 pr-3 text-left font-medium">Closest approach (UTC)</th>
                  <td className="py-1 pr-3">{g ? g.closeApproachUtc.slice(0, 16).replace('T', ' ') : '—'}</td>
                  <td className="py-1 pr-3">{n ? n.closeApproachUtc.slice(0, 16).replace('T', ' ') : '—'}</td>
                  <td className="py-1" />
                </tr>
                {(
                  [
                    ['Distance [km]', (e: NonNullable<typeof g>) => e.distanceKm, false],
                    ['Distance 1σ [km]', (e: NonNullable<typeof g>) => e.distanceSigmaKm, true],
                    ['Position 1σ, largest [km]', (e: NonNullable<typeof g>) => e.positionSigmaMaxKm, true],
                    ['Time 1σ [min]', (e: NonNullable<typeof g>) => e.timeSigmaMin, true],
                  ] as const
                ).map(([label, get, ratio]) => (
                  <tr key={label} className="border-t border-rule">
                    <th scope="row" className="py-1 pr-3 text-left font-medium">{label}</th>
                    <td className="py-1 pr-3">{g ? encounterText(get(g)) : '—'}</td>
                    <td className="py-1 pr-3">{n ? encounterText(get(n)) : '—'}</td>
                    <td className="py-1">{ratio && g && n && get(g) > 0 ? formatRatio(get(n) / get(g)) : ''}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          <p className="mt-2 text-xs text-ink-soft">
            Linear propagation of each fit's covariance{comparison.gravityOnlyRefitted && comparison.gravityOnlyEncounter !== undefined ? ' (gravity only: the fit redone on the non-gravitational fit\'s observations)' : ''}. {CAUTION_TEXT}
          </p>
        </section>
      </div>
    </Card>
  );
}
