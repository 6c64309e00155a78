/**
 * Cometary elements <-> Cartesian state for every conic (handbook METHODS.md §3.1–3.3; Vallado 2013 Alg. 9–10;
 * Curtis 2014 Alg. 4.2 and 4.5).
 *
 * Element set: q (perihelion distance), e, i, Ω (node), ω (argPeri), and one of: true anomaly ν, mean anomaly M
 * (ellipse/hyperbola), or time of perihelion Tp with the epoch it refers to. Angles in radians. Lengths and times
 * are in the units of μ (AU & days for the engine's heliocentric work; km & s in the textbook tests).
 *
 * The frame is whatever frame r, v are given in: Tocsin's element convention is the J2000 ecliptic (IAU 1976
 * obliquity), so callers rotate with frames.ts first (see input/solution.ts).
 *
 * Conventions (documented here because they are choices):
 * - q = p/(1+e) and 1/a = (1−e)/q, never a(1−e): both stay finite through e = 1.
 * - Tp from a state is the NEAREST perihelion passage (mean anomaly taken in [−π, π) for the computation), which is
 *   continuous through e = 1; `meanAnomaly` is reported in [0, 2π) for ellipses and signed for hyperbolas,
 *   null for the exact parabola.
 * - ν is reported in [0, 2π) for ellipses and in (−π, π) for open orbits (negative = inbound).
 * - Singular cases: for i = 0 (or π) the node is undefined and set to 0, ω then measures from the x-axis
 *   (longitude of perihelion); for e = 0, ω is undefined and set to 0, ν then measures from the node
 *   (argument of latitude).
 * - Time since perihelion uses one Stumpff-function formula for all conics, √μ (t − Tp) = e χ³ S(z) + q χ with
 *   z = (1−e)χ²/q, which has no 0/0 near e = 1.
 */
import type { Vec3 } from '../vec';
import { cross, dot, norm } from '../vec';
import { stumpffC, stumpffS } from './universal';
import {
  eccentricFromTrue,
  safeguardedNewton,
  solveKeplerElliptic,
  solveKeplerHyperbolic,
  trueFromEccentric,
  trueFromHyperbolic,
  wrapPi,
  wrapTwoPi,
} from './kepler';

export interface CometaryElements {
  /** perihelion distance (length unit of μ) */
  q: number;
  e: number;
  /** inclination, rad, [0, π] */
  i: number;
  /** longitude of the ascending node Ω, rad, [0, 2π) */
  node: number;
  /** argument of perihelion ω, rad, [0, 2π) */
  argPeri: number;
  /** epoch the anomalies refer to (time unit of μ; engine: TDB days since J2000) */
  epoch: number;
  /** time of the nearest perihelion passage */
  tp: number;
  /** true anomaly at epoch, rad */
  trueAnomaly: number;
  /** mean anomaly at epoch, rad: [0, 2π) for e < 1, e sinh H − H for e > 1, null for e = 1 */
  meanAnomaly: number | null;
  /** 1/a = (1 − e)/q (negative for hyperbolas, 0 for the parabola) */
  inverseA: number;
}

/** Input to elementsToState: shape plus one timing. Priority if several are present: trueAnomaly, meanAnomaly, tp. */
export interface ElementsInput {
  q: number;
  e: number;
  i: number;
  node: number;
  argPeri: number;
  trueAnomaly?: number;
  meanAnomaly?: number | null;
  /** time of perihelion; needs `epoch` (defaults to 0) */
  tp?: number;
  epoch?: number;
}

export class ElementsError extends RangeError {
  constructor(message: string) {
    super(message);
    this.name = 'ElementsError';
  }
}

/** Rotation perifocal -> reference frame, R = R3(−Ω) R1(−i) R3(−ω) (METHODS §3.2). Returns columns P, Q, W. */
function perifocalBasis(i: number, node: number, argPeri: number): { P: Vec3; Q: Vec3 } {
  const cO = Math.cos(node);
  const sO = Math.sin(node);
  const cw = Math.cos(argPeri);
  const sw = Math.sin(argPeri);
  const ci = Math.cos(i);
  const si = Math.sin(i);
  return {
    P: [cO * cw - sO * sw * ci, sO * cw + cO * sw * ci, sw * si],
    Q: [-cO * sw - sO * cw * ci, -sO * sw + cO * cw * ci, cw * si],
  };
}

function validateShape(el: ElementsInput): void {
  const { q, e, i } = el;
  if (!(q > 0) || !Number.isFinite(q)) throw new ElementsError(`perihelion distance q must be > 0, got ${q}`);
  if (!(e >= 0) || !Number.isFinite(e)) throw new ElementsError(`eccentricity e must be >= 0, got ${e}`);
  if (!(i >= 0 && i <= Math.PI)) throw new ElementsError(`inclination must be in [0, π] rad, got ${i}`);
  for (const k of ['node', 'argPeri'] as const) {
    if (!Number.isFinite(el[k])) throw new ElementsError(`${k} must be finite, got ${el[k]}`);
  }
}

/** Perifocal state at time dt after perihelion, via the universal anomaly χ (all conics). */
function perifocalFromTimeSincePeri(q: number, e: number, dt: number, mu: number): { x: number; y: number; vx: number; vy: number } {
  const sqrtMu = Math.sqrt(mu);
  const alpha = (1 - e) / q;
  let dtr = dt;
  if (alpha > 0) {
    const period = (2 * Math.PI) / (sqrtMu * Math.sqrt(alpha * alpha * alpha));
    if (Math.abs(dt) > period / 2) dtr = dt - period * Math.round(dt / period);
  }
  const target = sqrtMu * Math.abs(dtr);
  const sgn = dtr < 0 ? -1 : 1;
  // G(χ) = e χ³ S(αχ²) + q χ − √μ|Δt|, increasing, G'(χ) = r = q + e χ² C(αχ²).
  const G = (chi: number): [number, number] => {
    const chi2 = chi * chi;
    const z = alpha * chi2;
    const val = e * chi2 * chi * stumpffS(z) + q * chi - target;
    const r = q + e * chi2 * stumpffC(z);
    return Number.isFinite(val) ? [val, r] : [Infinity, Infinity];
  };
  // Bracket: G(0) = −√μ|Δt| ≤ 0 and G(√μ|Δt|/q) = e χ³ S ≥ 0 (S > 0 for every z). Overflowing values count as
  // +Infinity, so the safeguarded solver bisects down from a too-large upper end.
  const hi = target / q;
  let chi = 0;
  if (target > 0) {
    chi = safeguardedNewton(G, 0, hi, Math.min(hi, Math.cbrt((6 * target) / Math.max(e, 1e-300)))).x;
  }
  chi *= sgn;
  const chi2 = chi * chi;
  const z = alpha * chi2;
  const c = stumpffC(z);
  const s = stumpffS(z);
  const r = q + e * chi2 * c;
  const vp = Math.sqrt((mu * (1 + e)) / q);
  const x = q - chi2 * c; // q·f
  const y = Math.sqrt((1 + e) * q) * chi * (1 - z * s); // g·v_p
  const vx = (-sqrtMu * chi * (1 - z * s)) / r; // ḟ·q
  const vy = (1 - (chi2 * c) / r) * vp; // ġ·v_p
  return { x, y, vx, vy };
}

/** Time since perihelion (t − Tp) for true anomaly ν, all conics, nearest passage for ellipses. */
export function timeSincePerihelion(q: number, e: number, nu: number, mu: number): number {
  const nuW = wrapPi(nu);
  let chi: number;
  if (e < 1) {
    const E = eccentricFromTrue(nuW, e); // (−π, π]
    chi = E * Math.sqrt(q / (1 - e));
  } else if (e > 1) {
    const x = Math.sqrt((e - 1) / (e + 1)) * Math.tan(nuW / 2);
    if (!(Math.abs(x) < 1)) {
      throw new ElementsError(`true anomaly ${nu} rad is beyond the asymptote acos(−1/e) = ${Math.acos(-1 / e)} rad`);
    }
    const H = 2 * Math.atanh(x);
    chi = H * Math.sqrt(q / (e - 1));
  } else {
    if (!(Math.abs(nuW) < Math.PI)) throw new ElementsError('parabola: true anomaly must be in (−π, π)');
    chi = Math.sqrt(2 * q) * Math.tan(nuW / 2);
  }
  const z = ((1 - e) * chi * chi) / q;
  return (e * chi * chi * chi * stumpffS(z) + q * chi) / Math.sqrt(mu);
}

/** Cartesian state from cometary elements (all conics). */
export function elementsToState(el: ElementsInput, mu: number): { r: Vec3; v: Vec3 } {
  if (!(mu > 0)) throw new ElementsError(`mu must be > 0, got ${mu}`);
  validateShape(el);
  const { q, e } = el;
  let x: number, y: number, vx: number, vy: number;
  if (el.trueAnomaly !== undefined && el.trueAnomaly !== null) {
    const nu = el.trueAnomaly;
    if (e >= 1) {
      const nuW = wrapPi(nu);
      const limit = e === 1 ? Math.PI : Math.acos(-1 / e);
      if (!(Math.abs(nuW) < limit)) {
        throw new ElementsError(`true anomaly ${nu} rad is beyond the asymptote (|ν| must be < ${limit} rad)`);
      }
    }
    const p = q * (1 + e);
    const cn = Math.cos(nu);
    const sn = Math.sin(nu);
    const r = p / (1 + e * cn);
    const k = Math.sqrt(mu / p);
    x = r * cn;
    y = r * sn;
    vx = -k * sn;
    vy = k * (e + cn);
  } else if (el.meanAnomaly !== undefined && el.meanAnomaly !== null) {
    const M = el.meanAnomaly;
    if (e === 1) throw new ElementsError('mean anomaly is undefined for a parabola (e = 1): give tp or trueAnomaly');
    const nu = e < 1 ? trueFromEccentric(solveKeplerElliptic(M, e), e) : trueFromHyperbolic(solveKeplerHyperbolic(M, e), e);
    return elementsToState({ ...el, meanAnomaly: undefined, tp: undefined, trueAnomaly: nu }, mu);
  } else if (el.tp !== undefined) {
    const dt = (el.epoch ?? 0) - el.tp;
    if (!Number.isFinite(dt)) throw new ElementsError(`epoch − tp must be finite, got ${dt}`);
    ({ x, y, vx, vy } = perifocalFromTimeSincePeri(q, e, dt, mu));
  } else {
    throw new ElementsError('elements need one of trueAnomaly, meanAnomaly or tp (with epoch)');
  }
  const { P, Q } = perifocalBasis(el.i, el.node, el.argPeri);
  return {
    r: [x * P[0] + y * Q[0], x * P[1] + y * Q[1], x * P[2] + y * Q[2]],
    v: [vx * P[0] + vy * Q[0], vx * P[1] + vy * Q[1], vx * P[2] + vy * Q[2]],
  };
}

/** Tolerance below which e is treated as 0 and sin i as 0 for the singular-angle conventions. */
const SINGULAR_EPS = 1e-13;

/**
 * Cometary elements from a Cartesian state (METHODS §3.1), any conic. `epoch` (default 0) is the time of the
 * state, in the time unit of μ; it fixes `tp`.
 */
export function stateToElements(r: Vec3, v: Vec3, mu: number, epoch = 0): CometaryElements {
  if (!(mu > 0)) throw new ElementsError(`mu must be > 0, got ${mu}`);
  const rn = norm(r);
  if (!(rn > 0) || !Number.isFinite(rn)) throw new ElementsError('state: |r| must be finite and > 0');
  const h = cross(r, v);
  const hn = norm(h);
  if (!(hn > 0)) throw new ElementsError('state: rectilinear orbit (r × v = 0) has no orbital plane');
  const v2 = dot(v, v);
  const rv = dot(r, v);
  const c1 = v2 - mu / rn;
  const eVec: Vec3 = [(c1 * r[0] - rv * v[0]) / mu, (c1 * r[1] - rv * v[1]) / mu, (c1 * r[2] - rv * v[2]) / mu];
  let e = norm(eVec);
  const p = (hn * hn) / mu;
  const q = p / (1 + e);
  const i = Math.acos(Math.max(-1, Math.min(1, h[2] / hn)));
  const hHat: Vec3 = [h[0] / hn, h[1] / hn, h[2] / hn];
  // node vector n = ẑ × h
  const n: Vec3 = [-h[1], h[0], 0];
  const nn = Math.hypot(n[0], n[1]);
  const equatorial = nn <= SINGULAR_EPS * hn;
  const nHat: Vec3 = equatorial ? [1, 0, 0] : [n[0] / nn, n[1] / nn, 0];
  const node = equatorial ? 0 : wrapTwoPi(Math.atan2(n[1], n[0]));
  const circular = e <= SINGULAR_EPS;
  let argPeri: number;
  let nu: number;
  const rHat: Vec3 = [r[0] / rn, r[1] / rn, r[2] / rn];
  if (circular) {
    e = 0;
    argPeri = 0;
    nu = Math.atan2(dot(hHat, cross(nHat, rHat)), dot(nHat, rHat));
  } else {
    const eHat: Vec3 = [eVec[0] / e, eVec[1] / e, eVec[2] / e];
    argPeri = wrapTwoPi(Math.atan2(dot(hHat, cross(nHat, eHat)), dot(nHat, eHat)));
    nu = Math.atan2(dot(hHat, cross(eHat, rHat)), dot(eHat, rHat));
  }
  const dtPeri = timeSincePerihelion(q, e, nu, mu);
  let meanAnomaly: number | null;
  if (e < 1) {
    const alpha = (1 - e) / q;
    meanAnomaly = wrapTwoPi(Math.sqrt(mu * alpha * alpha * alpha) * dtPeri);
  } else if (e > 1) {
    const alpha = (e - 1) / q;
    meanAnomaly = Math.sqrt(mu * alpha * alpha * alpha) * dtPeri;
  } else {
    meanAnomaly = null;
  }
  return {
    q,
    e,
    i,
    node,
    argPeri,
    epoch,
    tp: epoch - dtPeri,
    trueAnomaly: e < 1 ? wrapTwoPi(nu) : nu,
    meanAnomaly,
    inverseA: (1 - e) / q,
  };
}

/** Semi-major axis (negative for hyperbolas, Infinity for the parabola). */
export function semiMajorAxis(el: Pick<CometaryElements, 'q' | 'e'>): number {
  return el.q / (1 - el.e);
}

/** Orbital period (time unit of μ), or null for open orbits. */
export function orbitalPeriod(el: Pick<CometaryElements, 'q' | 'e'>, mu: number): number | null {
  if (!(el.e < 1)) return null;
  const a = el.q / (1 - el.e);
  return 2 * Math.PI * Math.sqrt((a * a * a) / mu);
}
