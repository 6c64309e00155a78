/**
 * Special functions for Engine II: erfc (full relative precision in the tails), the standard normal
 * CDF/survival/density, log-gamma, the regularised incomplete beta function and its inverse.
 *
 * erfc: W. J. Cody, "Rational Chebyshev approximations for the error function", Math. Comp. 23 (1969) 631-638,
 * as implemented in Cody's SPECFUN routine CALERF (Netlib). The coefficient sets below are the published CALERF
 * ones (cross-read in several independent public copies). For x > 0.46875 erfc is computed directly from
 * exp(-x^2) times a rational function — never as 1 - erf — and exp(-x^2) is split as
 * exp(-xs^2) exp(-(x-xs)(x+xs)) with xs = trunc(16x)/16 (Cody's device) so that the rounding error of x^2 is not
 * amplified by the exponential.
 */

const SQRPI = 5.6418958354775628695e-1; // 1/sqrt(pi)
const THRESH = 0.46875;
/** Beyond this erfc(x) underflows to 0 in IEEE double (CALERF XBIG for double precision). */
const XBIG = 26.543;
/** Below this, erfc(-x) = 2 to double precision (CALERF XNEG). */
const XNEG = -26.628;

const A = [3.1611237438705656, 113.864154151050156, 377.485237685302021, 3209.37758913846947, 0.185777706184603153];
const B = [23.6012909523441209, 244.024637934444173, 1282.61652607737228, 2844.23683343917062];
const C = [
  0.564188496988670089, 8.88314979438837594, 66.1191906371416295, 298.635138197400131, 881.952221241769090,
  1712.04761263407058, 2051.07837782607147, 1230.33935479799725, 2.15311535474403846e-8,
];
const D = [
  15.7449261107098347, 117.693950891312499, 537.181101862009858, 1621.38957456669019, 3290.79923573345963,
  4362.61909014324716, 3439.36767414372164, 1230.33935480374942,
];
const P = [
  0.305326634961232344, 0.360344899949804439, 0.125781726111229246, 0.0160837851487422766,
  6.58749161529837803e-4, 0.0163153871373020978,
];
const Q = [2.56852019228982242, 1.87295284992346047, 0.527905102951428412, 0.0605183413124413191, 2.33520497626869185e-3];

/** erf(x) for |x| <= 0.46875 (CALERF first interval). */
function erfSmall(x: number): number {
  const ysq = x * x;
  let xnum = A[4] * ysq;
  let xden = ysq;
  for (let i = 0; i < 3; i++) {
    xnum = (xnum + A[i]) * ysq;
    xden = (xden + B[i]) * ysq;
  }
  return (x * (xnum + A[3])) / (xden + B[3]);
}

/** exp(y^2) * erfc(y) for y > 0.46875 (CALERF second and third intervals), without the exponential. */
function erfcxLarge(y: number): number {
  if (y <= 4) {
    let xnum = C[8] * y;
    let xden = y;
    for (let i = 0; i < 7; i++) {
      xnum = (xnum + C[i]) * y;
      xden = (xden + D[i]) * y;
    }
    return (xnum + C[7]) / (xden + D[7]);
  }
  const ysq = 1 / (y * y);
  let xnum = P[5] * ysq;
  let xden = ysq;
  for (let i = 0; i < 4; i++) {
    xnum = (xnum + P[i]) * ysq;
    xden = (xden + Q[i]) * ysq;
  }
  let r = (ysq * (xnum + P[4])) / (xden + Q[4]);
  r = (SQRPI - r) / y;
  return r;
}

/** exp(-y^2) computed with Cody's splitting, accurate to a few ulp even when y^2 is large. */
function expMinusSquare(y: number): number {
  const ys = Math.trunc(y * 16) / 16;
  const del = (y - ys) * (y + ys);
  return Math.exp(-ys * ys) * Math.exp(-del);
}

/** Error function erf(x). */
export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const y = Math.abs(x);
  if (y <= THRESH) return erfSmall(x);
  if (y >= 6) return x > 0 ? 1 : -1; // erfc(6) = 2.2e-17 < half an ulp of 1
  const e = expMinusSquare(y) * erfcxLarge(y);
  return x > 0 ? 1 - e : e - 1;
}

/**
 * Complementary error function erfc(x) = 1 - erf(x), to full relative precision for x > 0 (the tail), down to
 * underflow at x ~ 26.5 (erfc(26.5) ~ 1e-307; subnormal results below that lose relative precision).
 */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const y = Math.abs(x);
  if (y <= THRESH) return 1 - erfSmall(x);
  if (x < XNEG) return 2;
  if (x > XBIG + 1.5) return 0;
  const r = expMinusSquare(y) * erfcxLarge(y);
  return x > 0 ? r : 2 - r;
}

/** Scaled complementary error function erfcx(x) = exp(x^2) erfc(x), for x >= 0 (no overflow, no underflow). */
export function erfcx(x: number): number {
  if (x < 0) throw new RangeError('erfcx is implemented for x >= 0 only');
  if (x <= THRESH) return Math.exp(x * x) * (1 - erfSmall(x));
  return erfcxLarge(x);
}

const SQRT1_2 = Math.SQRT1_2;
const INV_SQRT_2PI = 0.3989422804014327; // 1/sqrt(2 pi)

/** Standard normal density phi(x). */
export function normalPdf(x: number): number {
  return INV_SQRT_2PI * Math.exp(-0.5 * x * x);
}

/**
 * Standard normal CDF Phi(x) = erfc(-x/sqrt 2)/2. Full relative precision in the lower tail (x < 0); relative
 * error there is bounded by about |x|^2 times the rounding error of x/sqrt(2) (1e-13 at x = -37).
 */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x * SQRT1_2);
}

/** Standard normal survival function Q(x) = 1 - Phi(x) = erfc(x/sqrt 2)/2, precise in the upper tail. */
export function normalSurvival(x: number): number {
  return 0.5 * erfc(x * SQRT1_2);
}

/** Gauss-Legendre 10-point nodes and weights on [-1, 1] (used for short intervals of the normal density). */
const GL10_X = [
  0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717,
];
const GL10_W = [
  0.2955242247147529, 0.2692667193099963, 0.219086362515982, 0.1494513491505806, 0.0666713443086881,
];

/**
 * P(a <= Z <= b) for Z ~ N(0, 1), without cancellation: in the tails it is a difference of survival (or CDF)
 * values of the same tail; for a short interval (where even that difference would cancel) it integrates the
 * density directly by 10-point Gauss-Legendre (exact to double precision when (b-a)(1+|a|+|b|) <= 1).
 */
export function normalIntervalProbability(a: number, b: number): number {
  if (!(b > a)) return 0;
  const w = b - a;
  if (Number.isFinite(w) && w * (1 + Math.max(Math.abs(a), Math.abs(b))) <= 1) {
    const mid = 0.5 * (a + b);
    const half = 0.5 * w;
    let s = 0;
    for (let i = 0; i < 5; i++) {
      s += GL10_W[i] * (normalPdf(mid - half * GL10_X[i]) + normalPdf(mid + half * GL10_X[i]));
    }
    return s * half;
  }
  if (a >= 0) return normalSurvival(a) - normalSurvival(b);
  if (b <= 0) return normalCdf(b) - normalCdf(a);
  return 1 - normalCdf(a) - normalSurvival(b);
}

/**
 * ln Gamma(x) for x > 0: Stirling's series with Bernoulli-number coefficients (exact rationals, through the
 * x^-13 term; truncation error < 1e-17 for x >= 10), after shifting x up to >= 10 with the recurrence
 * Gamma(x+1) = x Gamma(x). Standard asymptotic expansion (e.g. Abramowitz & Stegun 6.1.40) [M citation].
 */
export function logGamma(x: number): number {
  if (!(x > 0)) throw new RangeError(`logGamma needs x > 0, got ${x}`);
  let shift = 0;
  let prod = 1;
  while (x < 10) {
    prod *= x;
    x += 1;
    if (prod > 1e280) {
      shift += Math.log(prod);
      prod = 1;
    }
  }
  shift += Math.log(prod);
  const z = 1 / (x * x);
  const series =
    (1 / x) *
    (1 / 12 +
      z * (-1 / 360 + z * (1 / 1260 + z * (-1 / 1680 + z * (1 / 1188 + z * (-691 / 360360 + z * (1 / 156)))))));
  return (x - 0.5) * Math.log(x) - x + 0.9189385332046728 /* ln sqrt(2 pi) */ + series - shift;
}

/** Continued fraction for the incomplete beta function, modified Lentz (Press et al. 2007, Numerical Recipes 3rd ed., 6.4). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const FPMIN = 1e-300;
  const EPS = 1e-16;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < FPMIN) d = FPMIN;
  d = 1 / d;
  let h = d;
  const maxIter = 20000 + Math.ceil(10 * Math.sqrt(Math.max(a, b)));
  for (let m = 1; m <= maxIter; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < FPMIN) d = FPMIN;
    c = 1 + aa / c;
    if (Math.abs(c) < FPMIN) c = FPMIN;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < FPMIN) d = FPMIN;
    c = 1 + aa / c;
    if (Math.abs(c) < FPMIN) c = FPMIN;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= EPS) return h;
  }
  throw new Error(`incomplete beta continued fraction did not converge (a=${a}, b=${b}, x=${x})`);
}

/**
 * Regularised incomplete beta function I_x(a, b) (Press et al. 2007, Numerical Recipes 3rd ed., 6.4: prefactor
 * x^a (1-x)^b / (a B(a,b)) times the continued fraction, using the symmetry I_x(a,b) = 1 - I_{1-x}(b,a) where
 * the fraction converges faster).
 */
export function incompleteBetaRegularized(x: number, a: number, b: number): number {
  if (!(a > 0 && b > 0)) throw new RangeError(`incomplete beta needs a, b > 0 (a=${a}, b=${b})`);
  if (!(x >= 0 && x <= 1)) throw new RangeError(`incomplete beta needs 0 <= x <= 1, got ${x}`);
  if (x === 0) return 0;
  if (x === 1) return 1;
  const lnFront =
    logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log1p(-x);
  const front = Math.exp(lnFront);
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/**
 * Quantile of the Beta(a, b) distribution: the x with I_x(a, b) = p, by bisection on [0, 1] (I_x is monotone in
 * x), to a relative tolerance of 1e-13.
 */
export function betaQuantile(p: number, a: number, b: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`beta quantile needs 0 <= p <= 1, got ${p}`);
  if (p === 0) return 0;
  if (p === 1) return 1;
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (incompleteBetaRegularized(mid, a, b) < p) lo = mid;
    else hi = mid;
    if (hi - lo <= 1e-13 * hi || hi - lo < 1e-300) break;
  }
  return 0.5 * (lo + hi);
}
