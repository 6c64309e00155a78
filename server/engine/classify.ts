/**
 * Unbound (interstellar) classification, issue 3 item 6 (handbook METHODS.md §3.5).
 *
 * From a heliocentric ICRF state (AU, AU/d) and optionally its covariance:
 *   eccentricity e = |e⃗|, e⃗ = [(v² − μ/r) r − (r·v) v]/μ                           (METHODS §3.1)
 *   σ_e = √(g Γ gᵀ), g = ∂e/∂(x, y, z, vx, vy, vz) by CENTRAL FINITE DIFFERENCES      (linear propagation, §3.5)
 *         (step 1e-6 of |r| for positions and of |v| for velocities; truncation error O(h²) ≈ 1e-12 relative)
 *   significance S = (e − 1)/σ_e (negative for a bound orbit)
 *   heliocentric v∞ = √(−μ/a) = √(μ (e − 1)/q) for e > 1, in km/s
 *   perihelion distance q = p/(1 + e)
 * Values that do not apply are null: σ_e and S without a covariance (or with σ_e = 0), v∞ for e ≤ 1.
 *
 * This is the osculating heliocentric orbit at the epoch. An interstellar claim needs the ORIGINAL barycentric orbit
 * (integrated back to ~250 AU), and robustness to the non-gravitational model (METHODS §3.5 procedure); the
 * result therefore says which orbit it is.
 */
import { AU_KM, DAY_S, GM_AU3_D2 } from './constants';
import type { Vec3 } from './vec';
import { cross, dot, norm } from './vec';

export interface ClassificationInput {
  positionAu: Vec3;
  velocityAuD: Vec3;
  /** covariance with named rows; only x, y, z, vx, vy, vz (AU, AU/d) enter; other rows (a1..a3) are ignored */
  covariance?: { parameters: readonly string[]; matrix: readonly (readonly number[])[] } | null;
  /** GM in AU³/d², default GM_sun (DE440) */
  mu?: number;
}

export interface Classification {
  eccentricity: number;
  eccentricitySigma: number | null;
  unboundSignificance: number | null;
  bound: boolean;
  vInfinityKmS: number | null;
  perihelionAu: number;
  /** 1/a in 1/AU (negative when unbound) */
  inverseSemiMajorAxisPerAu: number;
  /** how e and σ_e were obtained */
  method: string;
}

export function eccentricityOf(r: Vec3, v: Vec3, mu: number): number {
  const rn = norm(r);
  const c1 = dot(v, v) - mu / rn;
  const rv = dot(r, v);
  return Math.hypot(c1 * r[0] - rv * v[0], c1 * r[1] - rv * v[1], c1 * r[2] - rv * v[2]) / mu;
}

/**
 * Jacobian ∂f/∂(x, y, z, vx, vy, vz) by central differences with steps hr (positions) and hv (velocities): rows the
 * outputs of f, columns the state. `difference(m, plus, minus)` is the difference used for output m (e.g. an angle
 * wrapped to (−π, π]); plain subtraction by default. Truncation error O(h²).
 */
export function centralDifferenceJacobian(
  f: (r: Vec3, v: Vec3) => number[],
  r: Vec3,
  v: Vec3,
  hr: number,
  hv: number,
  difference: (m: number, plus: number, minus: number) => number = (_m, plus, minus) => plus - minus,
): number[][] {
  const state = [...r, ...v];
  const columns = state.map((_, k) => {
    const h = k < 3 ? hr : hv;
    const plus = [...state];
    const minus = [...state];
    plus[k] += h;
    minus[k] -= h;
    const fp = f(plus.slice(0, 3) as Vec3, plus.slice(3) as Vec3);
    const fm = f(minus.slice(0, 3) as Vec3, minus.slice(3) as Vec3);
    return fp.map((x, m) => difference(m, x, fm[m]) / (2 * h));
  });
  return columns[0].map((_, m) => columns.map((c) => c[m]));
}

/** ∂e/∂(x, y, z, vx, vy, vz) by central differences. */
export function eccentricityGradient(r: Vec3, v: Vec3, mu: number): number[] {
  return centralDifferenceJacobian((rr, vv) => [eccentricityOf(rr, vv, mu)], r, v, 1e-6 * norm(r), 1e-6 * norm(v))[0];
}

/** σ = √(g C gᵀ): linear propagation of the 6×6 state covariance C to a quantity with state gradient g (§3.5). */
export function propagatedSigma(g: readonly number[], covariance: readonly (readonly number[])[]): number {
  let s2 = 0;
  for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) s2 += g[a] * covariance[a][b] * g[b];
  return Math.sqrt(Math.max(0, s2));
}

/**
 * The unbound test from e, σ_e and q (METHODS §3.5): S = (e − 1)/σ_e (null without σ_e or with σ_e = 0), bound
 * when e < 1, heliocentric v∞ = √(μ (e − 1)/q) for e > 1 in km/s (from 1/a = (1 − e)/q, consistent with e).
 */
export function unboundTest(
  e: number,
  sigma: number | null,
  q: number,
  mu: number = GM_AU3_D2.sun,
): Pick<Classification, 'unboundSignificance' | 'bound' | 'vInfinityKmS'> {
  const vInfAuD = e > 1 ? Math.sqrt((mu * (e - 1)) / q) : null;
  return {
    unboundSignificance: sigma !== null && sigma > 0 ? (e - 1) / sigma : null,
    bound: e < 1,
    vInfinityKmS: vInfAuD === null ? null : (vInfAuD * AU_KM) / DAY_S,
  };
}

const STATE_ROWS = ['x', 'y', 'z', 'vx', 'vy', 'vz'];

export function classifyOrbit(input: ClassificationInput): Classification {
  const mu = input.mu ?? GM_AU3_D2.sun;
  const r = input.positionAu;
  const v = input.velocityAuD;
  const rn = norm(r);
  if (!(rn > 0) || ![...r, ...v].every(Number.isFinite)) throw new RangeError('classifyOrbit: state must be finite with r > 0');
  const h = cross(r, v);
  const p = dot(h, h) / mu;
  const e = eccentricityOf(r, v, mu);
  const q = p / (1 + e);
  const inverseA = 2 / rn - dot(v, v) / mu;

  let sigma: number | null = null;
  let method = 'osculating heliocentric elements at the epoch (GM_sun, DE440)';
  const cov = input.covariance;
  if (cov) {
    const idx = STATE_ROWS.map((n) => cov.parameters.indexOf(n));
    if (idx.some((i) => i < 0)) throw new RangeError(`classifyOrbit: covariance must have rows ${STATE_ROWS.join(', ')}`);
    sigma = propagatedSigma(
      eccentricityGradient(r, v, mu),
      idx.map((i) => idx.map((j) => cov.matrix[i][j])),
    );
    method += '; σ_e by linear propagation of the covariance with a central-difference gradient of e';
  }
  // v∞ from 1/a = (1 − e)/q, consistent with e (vis-viva gives the same within rounding)
  const { unboundSignificance, bound, vInfinityKmS } = unboundTest(e, sigma, q, mu);
  return {
    eccentricity: e,
    eccentricitySigma: sigma,
    unboundSignificance,
    bound,
    vInfinityKmS,
    perihelionAu: q,
    inverseSemiMajorAxisPerAu: inverseA,
    method,
  };
}
