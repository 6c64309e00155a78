/**
 * Residual statistics per observatory (METHODS.md §9.1: "σ from the submitted uncertainties if credible"): are a
 * station's stated uncertainties borne out by its residuals, and does it show a systematic offset?
 *
 * For the used observations of one station (n of them), with ξ the residuals (RA·cos δ, δ) and σ the stated sigmas
 * (reported, or the analyst's for a reweighted station; the caller removes the nightly de-weighting, which models
 * correlation within a night, not the scatter of one observation; the RA/Dec correlation is ignored here):
 * - unweighted RMS (arcsec) and normalised RMS √(Σ(ξ/σ)² / 2n);
 * - weights test: Σ(ξ/σ)² against χ² with 2n degrees of freedom, two-sided (the fit's own 6 + k parameters take a
 *   share 2n/2N of them, negligible for the arcs this is meant for; common practice, no source); the stated
 *   uncertainties are called understated (residuals larger than they say) or overstated when the two-sided p-value
 *   is below WEIGHTS_P_VALUE, else consistent;
 * - offset per coordinate: the weighted mean μ = Σ(ξ/σ²)/Σ(1/σ²) and its standard error 1/√Σ(1/σ²), scaled up by
 *   the station's normalised RMS when that is above 1 (so understated weights do not make an offset look
 *   significant), and μ / s.e. as a significance (standard weighted mean; common practice, no source).
 * A station with fewer than MIN_OBSERVATIONS used observations is listed without a verdict.
 */
import type { Residual, StationStatistics } from '../../../shared/schemas/od';
import { chiSquareCdf, chiSquareSurvival } from './statistics';

/** Two-sided p-value below which a station's stated uncertainties are called inconsistent with its residuals. */
export const WEIGHTS_P_VALUE = 1e-3;
/** Fewest used observations for a verdict on a station's weights. */
export const MIN_OBSERVATIONS = 3;

type ResidualIn = Pick<Residual, 'stn' | 'raCosDecArcsec' | 'decArcsec' | 'sigmaRaArcsec' | 'sigmaDecArcsec' | 'status'>;

function weightedMean(values: number[], sigmas: number[]): { mean: number; standardError: number } {
  let sw = 0;
  let swx = 0;
  values.forEach((x, i) => {
    const w = 1 / (sigmas[i] * sigmas[i]);
    sw += w;
    swx += w * x;
  });
  return { mean: swx / sw, standardError: 1 / Math.sqrt(sw) };
}

/** Statistics of every station with at least one observation in the fit's input, by station code. */
export function stationStatistics(residuals: readonly ResidualIn[]): StationStatistics[] {
  const byStation = new Map<string, ResidualIn[]>();
  for (const r of residuals) {
    const list = byStation.get(r.stn);
    if (list) list.push(r);
    else byStation.set(r.stn, [r]);
  }
  return [...byStation.keys()].sort().map((stn) => {
    const all = byStation.get(stn)!;
    const used = all.filter((r) => r.status === 'used');
    const n = used.length;
    const base = { stn, used: n, notUsed: all.length - n };
    if (n === 0) {
      return { ...base, rmsArcsec: null, rmsNormalized: null, weights: 'too-few' as const, weightsPValue: null, offsetRaCosDecArcsec: null, offsetRaCosDecSigma: null, offsetDecArcsec: null, offsetDecSigma: null };
    }
    let sumSq = 0;
    let chi2 = 0;
    for (const r of used) {
      sumSq += r.raCosDecArcsec ** 2 + r.decArcsec ** 2;
      chi2 += (r.raCosDecArcsec / r.sigmaRaArcsec) ** 2 + (r.decArcsec / r.sigmaDecArcsec) ** 2;
    }
    const dof = 2 * n;
    const rmsNormalized = Math.sqrt(chi2 / dof);
    let weights: StationStatistics['weights'] = 'too-few';
    let weightsPValue: number | null = null;
    if (n >= MIN_OBSERVATIONS) {
      const high = chiSquareSurvival(chi2, dof);
      const low = chiSquareCdf(chi2, dof);
      weightsPValue = Math.min(1, 2 * Math.min(high, low));
      weights = weightsPValue >= WEIGHTS_P_VALUE ? 'consistent' : high < low ? 'understated' : 'overstated';
    }
    const inflate = Math.max(1, rmsNormalized);
    const ra = weightedMean(used.map((r) => r.raCosDecArcsec), used.map((r) => r.sigmaRaArcsec));
    const dec = weightedMean(used.map((r) => r.decArcsec), used.map((r) => r.sigmaDecArcsec));
    return {
      ...base,
      rmsArcsec: Math.sqrt(sumSq / dof),
      rmsNormalized,
      weights,
      weightsPValue,
      offsetRaCosDecArcsec: ra.mean,
      offsetRaCosDecSigma: ra.mean / (ra.standardError * inflate),
      offsetDecArcsec: dec.mean,
      offsetDecSigma: dec.mean / (dec.standardError * inflate),
    };
  });
}

/** One warning per station whose stated uncertainties its residuals contradict (for the fit's warning list). */
export function stationWeightWarnings(label: string, stats: readonly StationStatistics[]): string[] {
  return stats
    .filter((s) => s.weights === 'understated' || s.weights === 'overstated')
    .map((s) =>
      `${label}: station ${s.stn}'s residuals are ${s.rmsNormalized!.toFixed(2)} times its stated uncertainties over ${s.used} observations ` +
      `(uncertainties ${s.weights}; unweighted RMS ${s.rmsArcsec!.toFixed(2)}″); consider reweighting the station`,
    );
}
