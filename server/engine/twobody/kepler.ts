/**
 * Kepler-equation solvers and anomaly conversions (handbook METHODS.md §3.3; Vallado 2013 Alg. 2–4;
 * Curtis 2014 ch. 3; Meeus 1998 ch. 30). All angles in radians.
 *
 * Every solver is a safeguarded Newton iteration: the root is bracketed first, and any Newton step that leaves the
 * bracket is replaced by bisection, so convergence is guaranteed for every e and M (no divergence at e → 1).
 */

const TWO_PI = 2 * Math.PI;

/** Wrap to [0, 2π). */
export function wrapTwoPi(x: number): number {
  const y = x % TWO_PI;
  return y < 0 ? y + TWO_PI : y;
}

/** Wrap to [−π, π). */
export function wrapPi(x: number): number {
  return wrapTwoPi(x + Math.PI) - Math.PI;
}

/**
 * Safeguarded Newton on an increasing function with F(lo) ≤ 0 ≤ F(hi). `fdf` returns [F, F'].
 * Stops when the step is below ~2 ulp of x or the bracket has collapsed.
 */
export function safeguardedNewton(
  fdf: (x: number) => [number, number],
  lo: number,
  hi: number,
  x0: number,
  maxIterations = 200,
): { x: number; iterations: number } {
  // As rtsafe (Press et al., Numerical Recipes, §9.4): take the Newton step only if it stays inside the bracket and
  // the step is shrinking fast enough; otherwise bisect. This avoids the slow creep of Newton on exponential
  // (hyperbolic) functions started far from the root.
  let x = Math.min(Math.max(x0, lo), hi);
  let dxOld = hi - lo;
  for (let it = 1; it <= maxIterations; it++) {
    const [f, fp] = fdf(x);
    if (f === 0) return { x, iterations: it };
    if (f > 0 || !Number.isFinite(f)) hi = x;
    else lo = x;
    const newtonStep = f / fp;
    let xn = x - newtonStep;
    if (!Number.isFinite(xn) || xn <= lo || xn >= hi || Math.abs(2 * newtonStep) > Math.abs(dxOld)) {
      xn = 0.5 * (lo + hi);
    }
    dxOld = xn - x;
    const tol = 4e-16 * Math.max(Math.abs(xn), Number.MIN_VALUE * 1e10);
    if (Math.abs(xn - x) <= tol || hi - lo <= tol) return { x: xn, iterations: it };
    x = xn;
  }
  return { x, iterations: maxIterations };
}

/** E − sin E without cancellation for small |E|. */
export function eMinusSinE(E: number): number {
  if (Math.abs(E) > 0.5) return E - Math.sin(E);
  // series E^3/3! − E^5/5! + …
  const e2 = E * E;
  let term = (E * e2) / 6;
  let sum = term;
  for (let k = 2; k < 30; k++) {
    term *= -e2 / ((2 * k) * (2 * k + 1));
    sum += term;
    if (Math.abs(term) < 1e-17 * Math.abs(sum)) break;
  }
  return sum;
}

/** sinh H − H without cancellation for small |H|. */
export function sinhHMinusH(H: number): number {
  if (Math.abs(H) > 0.5) return Math.sinh(H) - H;
  const h2 = H * H;
  let term = (H * h2) / 6;
  let sum = term;
  for (let k = 2; k < 30; k++) {
    term *= h2 / ((2 * k) * (2 * k + 1));
    sum += term;
    if (Math.abs(term) < 1e-17 * Math.abs(sum)) break;
  }
  return sum;
}

/** Mean anomaly from eccentric anomaly (elliptic): M = E − e sin E, evaluated as (1−e)E + e(E − sin E). */
export function meanFromEccentric(E: number, e: number): number {
  return (1 - e) * E + e * eMinusSinE(E);
}

/**
 * Solve Kepler's equation E − e sin E = M for 0 ≤ e < 1. Returns E in the same 2π-turn as M
 * (E − M is in [−e, e]).
 */
export function solveKeplerElliptic(M: number, e: number): number {
  if (!(e >= 0 && e < 1)) throw new RangeError(`solveKeplerElliptic: e = ${e} is not elliptic (0 <= e < 1)`);
  if (!Number.isFinite(M)) throw new RangeError(`solveKeplerElliptic: M = ${M} is not finite`);
  const turns = Math.round(M / TWO_PI);
  const Mr = M - turns * TWO_PI; // in [−π, π]
  if (Mr === 0) return turns * TWO_PI;
  const sign = Mr < 0 ? -1 : 1;
  const m = Math.abs(Mr); // solve on [0, π]; the solution is in [m, min(m + e, π)]
  const E0 = e < 0.8 ? m + e * Math.sin(m) : Math.PI * 0.5 + m * 0.5; // simple starts; bracket guards the rest
  const { x } = safeguardedNewton(
    (E) => [meanFromEccentric(E, e) - m, 1 - e * Math.cos(E)],
    m,
    Math.min(m + e, Math.PI),
    E0,
  );
  return turns * TWO_PI + sign * x;
}

/** Solve e sinh H − H = M for e > 1 (hyperbolic Kepler equation). */
export function solveKeplerHyperbolic(M: number, e: number): number {
  if (!(e > 1)) throw new RangeError(`solveKeplerHyperbolic: e = ${e} is not hyperbolic (e > 1)`);
  if (!Number.isFinite(M)) throw new RangeError(`solveKeplerHyperbolic: M = ${M} is not finite`);
  if (M === 0) return 0;
  const sign = M < 0 ? -1 : 1;
  const m = Math.abs(M);
  // F(H) = e sinh H − H − m = (e−1)H + e(sinh H − H) − m is increasing and convex on H ≥ 0.
  // Bracket: F(asinh(m/e)) = −asinh(m/e) ≤ 0, and since sinh H ≥ H, F(H) ≥ (e−1) sinh H − m ≥ 0 for
  // H ≥ asinh(m/(e−1)).
  const lo = Math.asinh(m / e);
  const hi = Math.asinh(m / (e - 1));
  const { x } = safeguardedNewton(
    (H) => [(e - 1) * H + e * sinhHMinusH(H) - m, e * Math.cosh(H) - 1],
    lo,
    hi,
    lo,
  );
  return sign * x;
}

/**
 * Barker's equation for the parabola: D + D³/3 = Mp, where D = tan(ν/2) and Mp = √(μ/(2q³))·(t − Tp).
 * Closed form (Cardano; METHODS §3.3): W = 3 Mp, Y = ∛(W/2 + √(W²/4 + 1)), D = Y − 1/Y, then one or two Newton
 * polishes to remove the cancellation in Y − 1/Y for small W.
 */
export function solveBarker(Mp: number): number {
  if (!Number.isFinite(Mp)) throw new RangeError(`solveBarker: Mp = ${Mp} is not finite`);
  if (Mp === 0) return 0;
  const sign = Mp < 0 ? -1 : 1;
  const w = 3 * Math.abs(Mp);
  const y = Math.cbrt(w / 2 + Math.sqrt((w * w) / 4 + 1));
  let d = y - 1 / y;
  const target = Math.abs(Mp);
  for (let k = 0; k < 3; k++) {
    const f = d + (d * d * d) / 3 - target;
    const step = f / (1 + d * d);
    d -= step;
    if (Math.abs(step) <= 1e-16 * Math.abs(d)) break;
  }
  return sign * d;
}

/** True anomaly from eccentric anomaly (elliptic): tan(ν/2) = √((1+e)/(1−e)) tan(E/2). */
export function trueFromEccentric(E: number, e: number): number {
  const half = E / 2;
  return 2 * Math.atan2(Math.sqrt(1 + e) * Math.sin(half), Math.sqrt(1 - e) * Math.cos(half));
}

/** Eccentric anomaly from true anomaly (elliptic), in (−π, π]. */
export function eccentricFromTrue(nu: number, e: number): number {
  const half = nu / 2;
  return 2 * Math.atan2(Math.sqrt(1 - e) * Math.sin(half), Math.sqrt(1 + e) * Math.cos(half));
}

/** True anomaly from hyperbolic anomaly: tan(ν/2) = √((e+1)/(e−1)) tanh(H/2). */
export function trueFromHyperbolic(H: number, e: number): number {
  return 2 * Math.atan(Math.sqrt((e + 1) / (e - 1)) * Math.tanh(H / 2));
}

/** Hyperbolic anomaly from true anomaly; requires |ν| < acos(−1/e). */
export function hyperbolicFromTrue(nu: number, e: number): number {
  const x = Math.sqrt((e - 1) / (e + 1)) * Math.tan(nu / 2);
  if (!(Math.abs(x) < 1)) {
    throw new RangeError(`true anomaly ${nu} rad is beyond the asymptote acos(−1/e) = ${Math.acos(-1 / e)} rad`);
  }
  return 2 * Math.atanh(x);
}

/** Hyperbolic mean anomaly M_h = e sinh H − H, evaluated without cancellation. */
export function meanFromHyperbolic(H: number, e: number): number {
  return (e - 1) * H + e * sinhHMinusH(H);
}
