/**
 * Statistics for orbit determination (METHODS.md §9.1–9.2): the chi-square survival function through the
 * regularised incomplete gamma function, kept in logarithms so that large chi-square differences (thousands) still
 * give a finite significance, and the conversion of a p-value to a two-sided Gaussian sigma.
 *
 * Incomplete gamma: series for x < a + 1 and Lentz continued fraction otherwise (Press et al. 2007, Numerical
 * Recipes 3rd ed., §6.2). ln Gamma from risk/special.ts.
 */
import { erfcx, logGamma } from '../risk/special';

const EPS = 1e-16;
const FPMIN = 1e-300;

/** ln P(a, x) series part: returns ln of gamma(a,x)/Gamma(a) computed by the series (x < a + 1). */
function logGammaPSeries(a: number, x: number): number {
  let ap = a;
  let sum = 1 / a;
  let del = sum;
  for (let n = 0; n < 100_000; n++) {
    ap += 1;
    del *= x / ap;
    sum += del;
    if (Math.abs(del) < Math.abs(sum) * EPS) break;
  }
  return Math.log(sum) - x + a * Math.log(x) - logGamma(a);
}

/** ln Q(a, x) by the continued fraction (x >= a + 1). */
function logGammaQFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / FPMIN;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 100_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < FPMIN) d = FPMIN;
    c = b + an / c;
    if (Math.abs(c) < FPMIN) c = FPMIN;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return Math.log(h) - x + a * Math.log(x) - logGamma(a);
}

/** ln Q(a, x), Q the regularised upper incomplete gamma function, a > 0, x >= 0. */
export function logGammaQ(a: number, x: number): number {
  if (!(a > 0)) throw new RangeError(`incomplete gamma needs a > 0, got ${a}`);
  if (!(x >= 0)) throw new RangeError(`incomplete gamma needs x >= 0, got ${x}`);
  if (x === 0) return 0;
  if (x < a + 1) {
    const p = Math.exp(logGammaPSeries(a, x));
    return Math.log1p(-Math.min(p, 1));
  }
  return logGammaQFraction(a, x);
}

/** Q(a, x) = Gamma(a, x) / Gamma(a). */
export function gammaQ(a: number, x: number): number {
  return Math.exp(logGammaQ(a, x));
}

/** P(a, x) = 1 - Q(a, x). */
export function gammaP(a: number, x: number): number {
  if (x === 0) return 0;
  if (x < a + 1) return Math.exp(logGammaPSeries(a, x));
  return -Math.expm1(logGammaQFraction(a, x));
}

/** P(chi²_k >= x): survival function of the chi-square distribution with k degrees of freedom. */
export function chiSquareSurvival(x: number, k: number): number {
  if (x <= 0) return 1;
  return gammaQ(k / 2, x / 2);
}

/** ln P(chi²_k >= x) (finite even when the p-value underflows). */
export function logChiSquareSurvival(x: number, k: number): number {
  if (x <= 0) return 0;
  return logGammaQ(k / 2, x / 2);
}

/** P(chi²_k <= x). */
export function chiSquareCdf(x: number, k: number): number {
  if (x <= 0) return 0;
  return gammaP(k / 2, x / 2);
}

/** ln of the two-sided Gaussian tail 2 Phi_c(s) = erfc(s / sqrt 2), s >= 0, via erfcx (no underflow). */
function logTwoSidedTail(s: number): number {
  const z = s / Math.SQRT2;
  return Math.log(erfcx(z)) - z * z;
}

/**
 * The two-sided Gaussian significance s of a probability given by its logarithm: erfc(s/sqrt 2) = p
 * (p = 0.0455 -> 2 sigma, p = 0.0027 -> 3 sigma). Bisection on s in [0, 1e4]; 0 for p >= 1.
 */
export function sigmaFromLogPValue(logP: number): number {
  if (!(logP < 0)) return 0;
  let lo = 0;
  let hi = 1;
  while (logTwoSidedTail(hi) > logP && hi < 1e4) hi *= 2;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (logTwoSidedTail(mid) > logP) lo = mid;
    else hi = mid;
    if (hi - lo < 1e-12 * hi) break;
  }
  return 0.5 * (lo + hi);
}

/** Two-sided Gaussian significance of a p-value. */
export function sigmaFromPValue(p: number): number {
  return sigmaFromLogPValue(Math.log(p));
}

/**
 * Kolmogorov–Smirnov one-sample statistic D = sup |F_n(x) - F(x)| of a sample against a continuous CDF, and its
 * asymptotic p-value Q_KS(sqrt(n) D (1 + 0.12/... )) with Stephens' small-sample correction
 * (Press et al. 2007, Numerical Recipes 3rd ed., §14.3.3). Used by the tests of the fit covariance.
 */
export function kolmogorovSmirnov(sample: readonly number[], cdf: (x: number) => number): { d: number; pValue: number } {
  const xs = [...sample].sort((a, b) => a - b);
  const n = xs.length;
  if (n === 0) throw new RangeError('kolmogorovSmirnov needs a non-empty sample');
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = cdf(xs[i]);
    d = Math.max(d, Math.abs(f - i / n), Math.abs((i + 1) / n - f));
  }
  const en = Math.sqrt(n);
  const lambda = (en + 0.12 + 0.11 / en) * d;
  // Q_KS(lambda) = 2 sum_{j>=1} (-1)^{j-1} exp(-2 j² lambda²)
  let q = 0;
  if (lambda < 0.2) q = 1;
  else {
    for (let j = 1; j <= 200; j++) {
      const term = 2 * (j % 2 === 1 ? 1 : -1) * Math.exp(-2 * j * j * lambda * lambda);
      q += term;
      if (Math.abs(term) < 1e-12) break;
    }
  }
  return { d, pValue: Math.min(1, Math.max(0, q)) };
}
