// Consequence ranges of an assessment: size, and per approach the energy, with the assumptions the engine used.
import type { AssessmentResult } from '../../../shared/schemas/assessment';
import { formatDiameterRange, formatEnergyRange, formatPalermo, formatTorino, formatUtc } from '../../../shared/format';
import type { ResultSource } from '../../../shared/results/table';

export function ConsequenceRanges({ result, source }: { result: AssessmentResult; source: ResultSource }) {
  const assumptions = result.methodNotes?.consequences ?? [];
  const withEnergy = result.approaches.filter((a) => a.energyMt.nominal !== null);
  return (
    <div className="space-y-3 text-sm" data-testid="consequences">
      <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1">
        <dt className="font-medium">Diameter</dt>
        <dd>{formatDiameterRange(result.diameterM)}</dd>
        <dt className="font-medium">Cumulative Palermo</dt>
        <dd>{formatPalermo(result.palermoCumulative)}</dd>
        <dt className="font-medium">Highest Torino</dt>
        <dd>{formatTorino(result.torinoMax)}</dd>
        {withEnergy.map((a, i) => (
          <div key={i} className="contents">
            <dt className="font-medium">Impact energy, {a.body.charAt(0).toUpperCase() + a.body.slice(1)} {formatUtc(a.utc, { seconds: false }).slice(0, 10)}</dt>
            <dd>{formatEnergyRange(a.energyMt)} <span className="text-ink-soft">(v∞ {a.vInfinityKmS?.toFixed(2) ?? '—'} km/s)</span></dd>
          </div>
        ))}
      </dl>
      {result.diameterM.nominal === null && <p className="text-ink-soft">No absolute magnitude in solution v{source.solutionVersion}: no size, energy or ratings.</p>}
      {assumptions.length > 0 && (
        <details>
          <summary className="cursor-pointer text-accent-700">Assumptions behind these ranges ({assumptions.length})</summary>
          <table className="mt-2 w-full text-left text-xs">
            <thead>
              <tr><th className="py-1 pr-3">Quantity</th><th className="py-1 pr-3">Value</th><th className="py-1">Source</th></tr>
            </thead>
            <tbody>
              {assumptions.map((x, i) => (
                <tr key={i} className="border-t border-rule align-top"><td className="py-1 pr-3">{x.quantity}</td><td className="py-1 pr-3">{x.value}</td><td className="py-1 text-ink-soft">{x.source}</td></tr>
              ))}
            </tbody>
          </table>
        </details>
      )}
      <p className="text-xs text-ink-soft">Ranges are envelopes of the stated brackets, not confidence intervals (run #{source.runId}, solution v{source.solutionVersion}).</p>
    </div>
  );
}
