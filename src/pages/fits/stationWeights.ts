// Text of a fit's observatory reweighting (settings.stationWeights) for the fit page's settings line, and the
// stations a form can offer (those among an object's non-excluded observations, with their counts).
import type { StationWeight } from '../../../shared/schemas/od';

/** "HSC reweighted to 0.5″, HSA reweighted to 1.2″"; null when no station is reweighted. */
export function stationWeightsText(weights: readonly StationWeight[] | undefined): string | null {
  if (!weights || weights.length === 0) return null;
  return weights.map((w) => `${w.stn} reweighted to ${w.sigmaArcsec}″`).join(', ');
}

/** Stations of the observations a fit would use (not excluded), alphabetical, with how many each has. */
export function stationsOf(observations: readonly { stn: string; excluded: boolean }[]): { stn: string; count: number }[] {
  const counts = new Map<string, number>();
  for (const o of observations) if (!o.excluded) counts.set(o.stn, (counts.get(o.stn) ?? 0) + 1);
  return [...counts].sort(([a], [b]) => a.localeCompare(b)).map(([stn, count]) => ({ stn, count }));
}
