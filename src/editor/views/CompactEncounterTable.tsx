// A compact, read-only encounter table for a bulletin: date, body, miss distance and 3-sigma range, v-infinity,
// impact probability (as rated), Palermo, Torino and energy, formatted by shared/format.ts.
import { describeImpactProbability, formatDistance, formatDistanceRange, formatEnergyRange, formatPalermo, formatSpeedKmS, formatTorino, formatUtc } from '../../../shared/format';
import { safeParseAssessment } from '../../../shared/schemas/assessment';

export function CompactEncounterTable({ result, runId }: { result: Record<string, unknown>; runId: number }) {
  const parsed = safeParseAssessment(result);
  if (!parsed.ok) return <p className="text-sm text-danger-700">The engine result of run #{runId} could not be read ({parsed.error}).</p>;
  const approaches = parsed.value.approaches;
  if (approaches.length === 0) return <p className="text-sm text-ink-soft">Run #{runId}: no close approach within the reporting distance.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-left font-sans text-xs" data-testid="risk-table">
        <thead>
          <tr className="border-b-2 border-ink/70">
            <th scope="col" className="px-2 py-1.5 font-semibold">Date (UTC)</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Body</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Miss distance</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">3σ range</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">v∞</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Impact probability</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Palermo</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Torino</th>
            <th scope="col" className="px-2 py-1.5 font-semibold">Energy</th>
          </tr>
        </thead>
        <tbody>
          {approaches.map((a, i) => {
            const ip = describeImpactProbability(a.impactProbability, a.ratingProbabilitySource ?? null);
            return (
              <tr key={i} className="border-b border-rule align-top tabular-nums">
                <td className="px-2 py-1.5 whitespace-nowrap">{formatUtc(a.utc, { seconds: false })}</td>
                <td className="px-2 py-1.5 capitalize">{a.body}</td>
                <td className="px-2 py-1.5 whitespace-nowrap">{formatDistance(a.distanceKm)}</td>
                <td className="px-2 py-1.5 whitespace-nowrap">{formatDistanceRange(a.distanceRangeKm?.threeSigma ?? null)}</td>
                <td className="px-2 py-1.5 whitespace-nowrap">{formatSpeedKmS(a.vInfinityKmS)}</td>
                <td className="px-2 py-1.5">
                  {ip.text}
                  {ip.method && <span className="block text-ink-soft">{ip.method}</span>}
                </td>
                <td className="px-2 py-1.5">{formatPalermo(a.palermo)}</td>
                <td className="px-2 py-1.5">{formatTorino(a.torino)}</td>
                <td className="px-2 py-1.5">{formatEnergyRange(a.energyMt)}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
