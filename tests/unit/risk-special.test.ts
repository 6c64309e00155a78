import { describe, expect, it } from 'vitest';
import {
  betaQuantile,
  erf,
  erfc,
  erfcx,
  incompleteBetaRegularized,
  logGamma,
  normalCdf,
  normalIntervalProbability,
  normalPdf,
  normalSurvival,
} from '../../server/engine/risk/special';

// ---------------------------------------------------------------------------------------------
// Independent high-precision reference for erfc: BigInt fixed-point arithmetic with DIGITS decimal
// digits. erf(x) = 2/sqrt(pi) * sum_n (-1)^n x^(2n+1) / (n! (2n+1)) (Maclaurin series, Abramowitz &
// Stegun 7.1.5), pi from Machin's formula pi = 16 atan(1/5) - 4 atan(1/239), sqrt by Newton's method on
// integers. The alternating series loses ~x^2/ln(10) digits to cancellation, hence the large DIGITS.
// erfc = 1 - erf is formed in this exact arithmetic, so the tail value keeps its full precision.
// ---------------------------------------------------------------------------------------------
const DIGITS = 760;
const SCALE = 10n ** BigInt(DIGITS);

function atanInv(k: bigint): bigint {
  // atan(1/k) * SCALE
  let sum = 0n;
  let power = SCALE / k; // 1/k^(2n+1)
  const k2 = k * k;
  for (let n = 0n; power !== 0n; n++) {
    const term = power / (2n * n + 1n);
    sum += n % 2n === 0n ? term : -term;
    power /= k2;
  }
  return sum;
}

function isqrt(v: bigint): bigint {
  let x = BigInt(Math.floor(Math.sqrt(Number(v.toString().slice(0, 15))))) * 10n ** BigInt(Math.floor((v.toString().length - 15) / 2));
  if (x <= 0n) x = 1n;
  for (;;) {
    const y = (x + v / x) / 2n;
    if (y >= x - 1n && y <= x + 1n) {
      let r = y;
      while (r * r > v) r -= 1n;
      while ((r + 1n) * (r + 1n) <= v) r += 1n;
      return r;
    }
    x = y;
  }
}

const PI_SCALED = 16n * atanInv(5n) - 4n * atanInv(239n);
const SQRT_PI_SCALED = isqrt(PI_SCALED * SCALE);

/** erfc(p/q) as a double, from the exact-arithmetic series. */
function erfcReference(p: bigint, q: bigint): number {
  let a = (SCALE * p) / q; // x^(2n+1)/n! scaled
  let sum = a;
  const p2 = p * p;
  const q2 = q * q;
  for (let n = 1n; ; n++) {
    a = (a * p2) / (q2 * n);
    const term = a / (2n * n + 1n);
    sum += n % 2n === 0n ? term : -term;
    if (a === 0n) break;
  }
  const erfScaled = (2n * sum * SCALE) / SQRT_PI_SCALED;
  const erfcScaled = SCALE - erfScaled;
  return Number(`${erfcScaled.toString()}e-${DIGITS}`);
}

describe('erfc (Cody 1969 rational approximations)', () => {
  // Reference: the exact-arithmetic series above (computed in the test, not recalled).
  const cases: Array<[bigint, bigint]> = [
    [1n, 10n], [1n, 2n], [46875n, 100000n], [47n, 100n], [1n, 1n], [3n, 2n], [37n, 10n], [4n, 1n], [41n, 10n],
    [5n, 1n], [7n, 1n], [10n, 1n], [15n, 1n], [20n, 1n], [26n, 1n],
  ];
  for (const [p, q] of cases) {
    const x = Number(p) / Number(q);
    it(`erfc(${x}) matches the ${DIGITS}-digit series to 4e-15 relative`, () => {
      const ref = erfcReference(p, q);
      const got = erfc(x);
      expect(Math.abs(got - ref) / ref).toBeLessThan(4e-15);
    });
  }

  it('reproduces values recalled from memory (A&S table 7.1 style): erfc(1) = 0.157299207050285, erfc(5) = 1.53745979442803e-12', () => {
    // Recalled from memory; the series check above is the authoritative one.
    expect(erfc(1)).toBeCloseTo(0.157299207050285, 14);
    expect(erfc(5) / 1.53745979442803e-12).toBeCloseTo(1, 12);
  });

  it('is continuous at the interval boundaries 0.46875 and 4 and symmetric: erfc(-x) = 2 - erfc(x)', () => {
    for (const b of [0.46875, 4]) {
      const lo = erfc(b * (1 - 1e-15));
      const hi = erfc(b * (1 + 1e-15));
      expect(Math.abs(lo - hi) / hi).toBeLessThan(1e-13);
    }
    for (const x of [0.2, 1.3, 3.3, 6]) expect(erfc(-x)).toBeCloseTo(2 - erfc(x), 15);
    expect(erfc(0)).toBe(1);
    expect(erfc(-30)).toBe(2);
    expect(erfc(40)).toBe(0);
  });

  it('erf + erfc = 1 and erfcx = exp(x^2) erfc(x)', () => {
    for (const x of [0.1, 0.4, 0.9, 2.5, 4.5]) {
      expect(erf(x) + erfc(x)).toBeCloseTo(1, 15);
      expect(erfcx(x) / (Math.exp(x * x) * erfc(x))).toBeCloseTo(1, 13);
    }
    // erfcx(x) ~ 1/(x sqrt(pi)) (1 - 1/(2x^2) + 3/(4x^4)) for large x (A&S 7.1.23)
    const x = 1e3;
    expect(erfcx(x) * x * Math.sqrt(Math.PI)).toBeCloseTo(1 - 1 / (2 * x * x) + 3 / (4 * x ** 4), 14);
  });
});

describe('normal distribution', () => {
  it('CDF and survival are erfc-based and precise in both tails', () => {
    // Phi(-x) = Q(x), Phi(x) + Q(x) = 1 (definitions).
    for (const x of [0, 0.5, 1.96, 5, 20, 37]) {
      expect(normalCdf(-x)).toBe(normalSurvival(x));
      expect(normalCdf(x) + normalSurvival(x)).toBeCloseTo(1, 15);
    }
    // Q(1.959963984540054) = 0.025 (the 97.5% quantile, recalled from memory).
    expect(normalSurvival(1.959963984540054)).toBeCloseTo(0.025, 14);
    // Mills-ratio asymptotics Q(x) ~ phi(x)/x (1 - 1/x^2 + 3/x^4 - 15/x^6 + ...) at x = 30 (A&S 26.2.12);
    // truncation after the x^-12 term leaves < 1e-15 relative.
    const x = 30;
    const asym =
      (normalPdf(x) / x) *
      (1 - 1 / x ** 2 + 3 / x ** 4 - 15 / x ** 6 + 105 / x ** 8 - 945 / x ** 10 + 10395 / x ** 12);
    expect(Math.abs(normalSurvival(x) - asym) / asym).toBeLessThan(1e-12);
  });

  it('interval probabilities avoid cancellation', () => {
    // Short interval deep in the tail: exact value by the mean-value expansion phi(m) w (1 + w^2 (m^2-1)/24).
    const a = 12 - 5e-10;
    const b = 12 + 5e-10;
    const w = b - a; // exact (Sterbenz)
    const m = 0.5 * (a + b);
    const expected = normalPdf(m) * w * (1 + (w * w * (m * m - 1)) / 24);
    expect(normalIntervalProbability(a, b) / expected).toBeCloseTo(1, 12);
    // Long intervals: differences of the same tail.
    expect(normalIntervalProbability(8, 9) / (normalSurvival(8) - normalSurvival(9))).toBeCloseTo(1, 13);
    expect(normalIntervalProbability(-1.959963984540054, 1.959963984540054)).toBeCloseTo(0.95, 14);
    expect(normalIntervalProbability(3, 2)).toBe(0);
  });
});

describe('log-gamma and the incomplete beta function', () => {
  it('logGamma matches ln((n-1)!) and Gamma(1/2) = sqrt(pi)', () => {
    let lnFact = 0;
    for (let n = 1; n <= 170; n++) {
      // ln Gamma(n) = ln((n-1)!)
      expect(Math.abs(logGamma(n) - lnFact)).toBeLessThan(1e-13 * Math.max(1, lnFact));
      lnFact += Math.log(n);
    }
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 14);
    expect(logGamma(1.5)).toBeCloseTo(Math.log(Math.sqrt(Math.PI) / 2), 14);
  });

  it('I_x(a, b) matches closed forms and binomial tail sums', () => {
    // I_x(1, b) = 1 - (1 - x)^b and I_x(a, 1) = x^a (definition of the regularised incomplete beta).
    expect(incompleteBetaRegularized(0.01, 1, 1000)).toBeCloseTo(-Math.expm1(1000 * Math.log1p(-0.01)), 13);
    expect(incompleteBetaRegularized(0.7, 3.5, 1)).toBeCloseTo(0.7 ** 3.5, 14);
    // I_p(k, n-k+1) = P(X >= k) for X ~ Binomial(n, p) (standard identity, e.g. Numerical Recipes 6.4).
    const n = 40;
    const p = 0.13;
    for (const k of [1, 3, 5, 10, 20]) {
      let tail = 0;
      for (let j = k; j <= n; j++) {
        const lnC = logGamma(n + 1) - logGamma(j + 1) - logGamma(n - j + 1);
        tail += Math.exp(lnC + j * Math.log(p) + (n - j) * Math.log1p(-p));
      }
      expect(incompleteBetaRegularized(p, k, n - k + 1) / tail).toBeCloseTo(1, 11);
    }
  });

  it('betaQuantile inverts I_x and reproduces the K = 0 closed form 1 - (alpha/2)^(1/N)', () => {
    for (const N of [10, 1000, 1e6]) {
      const x = betaQuantile(0.975, 1, N);
      const closed = -Math.expm1(Math.log(0.025) / N);
      expect(x / closed).toBeCloseTo(1, 10);
    }
    const q = betaQuantile(0.3, 2.5, 7);
    expect(incompleteBetaRegularized(q, 2.5, 7)).toBeCloseTo(0.3, 12);
  });
});
