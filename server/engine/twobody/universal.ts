/**
 * Universal-variable Kepler propagation (handbook METHODS.md §3.4; Curtis 2014 Alg. 3.3–3.4, eqs. 3.49 and 3.69;
 * Vallado 2013 Alg. 8; Stumpff 1959). Valid for elliptic, parabolic and hyperbolic motion alike.
 *
 * Units are whatever μ uses (km & s with km³/s², or AU & days with AU³/d²).
 *
 * Universal Kepler equation, α = 1/a = 2/r₀ − v₀²/μ, σ₀ = r₀·v₀/√μ, z = αχ²:
 *   √μ Δt = σ₀ χ² C(z) + (1 − α r₀) χ³ S(z) + r₀ χ ≡ F(χ),   F′(χ) = r(χ) > 0.
 * F is strictly increasing, so the root is bracketed and found by safeguarded Newton (bisection fallback):
 * no divergence at any eccentricity. For bound orbits Δt is first reduced by whole periods.
 *
 * Conditioning: started far out on a hyperbola and run back towards perihelion, the terms σ₀χ²C and
 * (1−αr₀)χ³S are huge and cancel, so the result loses digits (~7 for 100 years on a q = 1 AU, e = 3 orbit; ~1e-5
 * relative for 10^5 years). The time-of-perihelion path in elements.ts has only positive terms and is well
 * conditioned; use it (stateToElements + elementsToState) for such arcs.
 */
import type { Vec3 } from '../vec';
import { dot, norm } from '../vec';
import { safeguardedNewton } from './kepler';

/** Stumpff C(z) = (1 − cos√z)/z (z > 0), (cosh√−z − 1)/(−z) (z < 0), 1/2 at 0; series for |z| ≤ 4. */
export function stumpffC(z: number): number {
  if (Math.abs(z) <= 4) {
    // Σ (−z)^k / (2k+2)!
    let term = 0.5;
    let sum = term;
    for (let k = 1; k < 40; k++) {
      term *= -z / ((2 * k + 1) * (2 * k + 2));
      sum += term;
      if (Math.abs(term) < 1e-18 * Math.abs(sum)) break;
    }
    return sum;
  }
  if (z > 0) {
    const s = Math.sin(Math.sqrt(z) / 2);
    return (2 * s * s) / z; // = (1 − cos√z)/z without cancellation
  }
  const sh = Math.sinh(Math.sqrt(-z) / 2);
  return (2 * sh * sh) / -z; // = (cosh√−z − 1)/(−z); Infinity past overflow (√−z ≳ 1420)
}

/** Stumpff S(z) = (√z − sin√z)/√z³ (z > 0), (sinh√−z − √−z)/√−z³ (z < 0), 1/6 at 0; series for |z| ≤ 4. */
export function stumpffS(z: number): number {
  if (Math.abs(z) <= 4) {
    // Σ (−z)^k / (2k+3)!
    let term = 1 / 6;
    let sum = term;
    for (let k = 1; k < 40; k++) {
      term *= -z / ((2 * k + 2) * (2 * k + 3));
      sum += term;
      if (Math.abs(term) < 1e-18 * Math.abs(sum)) break;
    }
    return sum;
  }
  if (z > 0) {
    const sz = Math.sqrt(z);
    return (sz - Math.sin(sz)) / (sz * sz * sz);
  }
  const sz = Math.sqrt(-z);
  return (Math.sinh(sz) - sz) / (sz * sz * sz);
}

export interface UniversalResult {
  r: Vec3;
  v: Vec3;
  /** universal anomaly χ (length^½) for the (period-reduced) time step */
  chi: number;
  /** Lagrange coefficients; diagnostic f ġ − ḟ g = 1 */
  f: number;
  g: number;
  fdot: number;
  gdot: number;
  iterations: number;
}

/**
 * Propagate a two-body state by dt with universal variables; returns the state plus χ and the Lagrange
 * coefficients. dt may be negative.
 */
export function keplerUniversal(r0: Vec3, v0: Vec3, dt: number, mu: number): UniversalResult {
  if (!(mu > 0)) throw new RangeError(`keplerUniversal: mu must be > 0, got ${mu}`);
  if (!Number.isFinite(dt)) throw new RangeError(`keplerUniversal: dt must be finite, got ${dt}`);
  const r0n = norm(r0);
  if (!(r0n > 0)) throw new RangeError('keplerUniversal: |r0| must be > 0');
  const sqrtMu = Math.sqrt(mu);
  const v0sq = dot(v0, v0);
  const alpha = 2 / r0n - v0sq / mu;
  const sigma0 = dot(r0, v0) / sqrtMu;
  const oneMinusAlphaR0 = 1 - alpha * r0n;

  // Reduce by whole periods for bound orbits (keeps χ small; the final state is unchanged).
  let dtr = dt;
  if (alpha > 0) {
    const period = (2 * Math.PI) / (sqrtMu * Math.sqrt(alpha * alpha * alpha));
    if (Math.abs(dt) > period) dtr = dt - period * Math.round(dt / period);
  }
  if (dtr === 0) {
    return { r: [...r0] as Vec3, v: [...v0] as Vec3, chi: 0, f: 1, g: 0, fdot: 0, gdot: 1, iterations: 0 };
  }
  const target = sqrtMu * dtr;

  const F = (chi: number): [number, number] => {
    const chi2 = chi * chi;
    const z = alpha * chi2;
    const c = stumpffC(z);
    const s = stumpffS(z);
    const val = sigma0 * chi2 * c + oneMinusAlphaR0 * chi2 * chi * s + r0n * chi - target;
    const rr = sigma0 * chi * (1 - z * s) + oneMinusAlphaR0 * chi2 * c + r0n;
    return [val, rr];
  };

  // Initial guess: Curtis χ₀ = √μ |α| Δt for ellipses; otherwise a conservative r0-based guess.
  let guess: number;
  if (alpha > 1e-12 / r0n) guess = sqrtMu * alpha * dtr;
  else guess = target / r0n;
  if (alpha < -1e-12 / r0n) {
    // Vallado 2013 Alg. 8 hyperbolic starter: χ₀ = sgn(Δt)√(−a) ln[(−2μαΔt)/(r₀·v₀ + sgn(Δt)√(−μa)(1 − r₀α))]
    const a = 1 / alpha;
    const sg = dtr > 0 ? 1 : -1;
    const arg = (-2 * mu * alpha * dtr) / (sigma0 * sqrtMu + sg * Math.sqrt(-mu * a) * oneMinusAlphaR0);
    const g = sg * Math.sqrt(-a) * Math.log(arg);
    if (Number.isFinite(g) && g * dtr > 0) guess = g;
  }
  // Bracket the root of the increasing function: F(0) = −target.
  let lo: number;
  let hi: number;
  const sgn = dtr > 0 ? 1 : -1;
  let step = Math.max(Math.abs(guess), 1e-12 * Math.sqrt(r0n));
  if (sgn > 0) {
    lo = 0;
    hi = step;
    for (let k = 0; k < 2000; k++) {
      const [fv] = F(hi);
      if (fv >= 0 || !Number.isFinite(fv)) break;
      lo = hi;
      step *= 2;
      hi = lo + step;
    }
  } else {
    hi = 0;
    lo = -step;
    for (let k = 0; k < 2000; k++) {
      const [fv] = F(lo);
      if (fv <= 0 || !Number.isFinite(fv)) break;
      hi = lo;
      step *= 2;
      lo = hi - step;
    }
  }
  // F may be −Infinity/NaN at an overflowed lower end; the safeguarded solver bisects away from it.
  const Fguard = (chi: number): [number, number] => {
    const out = F(chi);
    if (!Number.isFinite(out[0])) return [chi > 0 ? Infinity : -Infinity, Infinity];
    return out;
  };
  const { x: chi, iterations } = safeguardedNewton(Fguard, lo, hi, Math.min(Math.max(guess, lo), hi));

  const chi2 = chi * chi;
  const z = alpha * chi2;
  const c = stumpffC(z);
  const s = stumpffS(z);
  const f = 1 - (chi2 / r0n) * c;
  const g = dtr - (chi2 * chi * s) / sqrtMu;
  const r: Vec3 = [f * r0[0] + g * v0[0], f * r0[1] + g * v0[1], f * r0[2] + g * v0[2]];
  const rn = norm(r);
  const fdot = (sqrtMu / (rn * r0n)) * (z * chi * s - chi);
  const gdot = 1 - (chi2 / rn) * c;
  const v: Vec3 = [fdot * r0[0] + gdot * v0[0], fdot * r0[1] + gdot * v0[1], fdot * r0[2] + gdot * v0[2]];
  return { r, v, chi, f, g, fdot, gdot, iterations };
}

/** Two-body propagation of (r0, v0) by dt (any conic, either direction). */
export function propagateKepler(r0: Vec3, v0: Vec3, dt: number, mu: number): { r: Vec3; v: Vec3 } {
  const { r, v } = keplerUniversal(r0, v0, dt, mu);
  return { r, v };
}
