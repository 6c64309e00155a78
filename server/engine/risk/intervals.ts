/**
 * Binomial confidence statements for Monte Carlo impact probabilities (METHODS.md 6.5).
 * - Wilson score interval (Wilson 1927, JASA 22, 209).
 * - Clopper-Pearson exact interval (Clopper & Pearson 1934, Biometrika 26, 404) via the Beta quantile.
 * - Rule of three for zero hits (Hanley & Lippman-Hand 1983, JAMA 249, 1743): one-sided 95% upper bound
 *   1 - 0.05^(1/N) ~ 3/N. Zero hits are never reported as a probability of 0.
 */
import { betaQuantile } from './special';

/** Two-sided 95% standard normal quantile z_{0.975} = 1.959963984540054 (METHODS.md rounds it to 1.96). */
export const Z95 = 1.959963984540054;

function checkCounts(hits: number, samples: number): void {
  if (!Number.isInteger(hits) || !Number.isInteger(samples) || samples <= 0 || hits < 0 || hits > samples) {
    throw new RangeError(`need integers 0 <= hits <= samples, samples > 0 (hits=${hits}, samples=${samples})`);
  }
}

/** Wilson score interval [lo, hi] for K successes in N trials. */
export function wilsonInterval(hits: number, samples: number, z = Z95): [number, number] {
  checkCounts(hits, samples);
  const n = samples;
  const p = hits / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At K = 0 (K = N) the lower (upper) bound is exactly 0 (1); the formula gives it up to round-off.
  const lo = hits === 0 ? 0 : Math.max(0, centre - half);
  const hi = hits === samples ? 1 : Math.min(1, centre + half);
  return [lo, hi];
}

/** Clopper-Pearson interval at confidence 1 - alpha: [B^-1(alpha/2; K, N-K+1), B^-1(1-alpha/2; K+1, N-K)]. */
export function clopperPearsonInterval(hits: number, samples: number, alpha = 0.05): [number, number] {
  checkCounts(hits, samples);
  const lo = hits === 0 ? 0 : betaQuantile(alpha / 2, hits, samples - hits + 1);
  const hi = hits === samples ? 1 : betaQuantile(1 - alpha / 2, hits + 1, samples - hits);
  return [lo, hi];
}

/** Exact one-sided upper bound at the given confidence: B^-1(conf; K+1, N-K); for K = 0, 1 - (1-conf)^(1/N). */
export function oneSidedUpperBound(hits: number, samples: number, confidence = 0.95): number {
  checkCounts(hits, samples);
  if (hits === samples) return 1;
  if (hits === 0) return ruleOfThreeUpper(samples, confidence);
  return betaQuantile(confidence, hits + 1, samples - hits);
}

/** Zero hits in N: one-sided upper bound 1 - (1 - confidence)^(1/N) (~ 3/N at 95%), computed without cancellation. */
export function ruleOfThreeUpper(samples: number, confidence = 0.95): number {
  if (!(samples > 0)) throw new RangeError(`samples must be > 0, got ${samples}`);
  return -Math.expm1(Math.log1p(-confidence) / samples);
}

export type BinomialEstimate = {
  hits: number;
  samples: number;
  /** K/N when K > 0; null when K = 0 (zero hits is an upper bound, never a probability of 0). */
  estimate: number | null;
  /** Wilson 95% interval. */
  ci95: [number, number];
  /** Clopper-Pearson 95% interval (exact, conservative). */
  clopperPearson95: [number, number];
  /** One-sided exact 95% upper bound (for K = 0 the rule of three, 1 - 0.05^(1/N)). */
  upperBound95: number;
  /** Human phrase, e.g. "below 3.0e-3 at 95% (0 hits in 1000)". */
  phrase: string;
  method: string;
};

const fmt = (x: number) => x.toExponential(1);

/** The Monte Carlo impact-probability statement for K hits in N equally weighted samples. */
export function binomialEstimate(hits: number, samples: number): BinomialEstimate {
  checkCounts(hits, samples);
  const ci95 = wilsonInterval(hits, samples);
  const clopperPearson95 = clopperPearsonInterval(hits, samples);
  const upperBound95 = oneSidedUpperBound(hits, samples, 0.95);
  const estimate = hits > 0 ? hits / samples : null;
  const phrase =
    hits === 0
      ? `below ${fmt(upperBound95)} at 95% (0 hits in ${samples})`
      : `${fmt(estimate!)} (95% interval ${fmt(ci95[0])} to ${fmt(ci95[1])}; ${hits} hit${hits === 1 ? '' : 's'} in ${samples})`;
  return {
    hits,
    samples,
    estimate,
    ci95,
    clopperPearson95,
    upperBound95,
    phrase,
    method:
      'plain Monte Carlo, binomial: Wilson 1927 score interval; Clopper-Pearson 1934 exact interval; one-sided bound (rule of three when K = 0)',
  };
}
