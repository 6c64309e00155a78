/**
 * Preliminary orbit by Gauss's method with the universal-variable improvement (METHODS.md §9.3; Curtis 2014,
 * Orbital Mechanics for Engineering Students 3rd ed., Alg. 5.5 and 5.6; Vallado 2013 Alg. 52).
 *
 * Input: three observation times t_i, observer positions R_i and unit lines of sight ρ̂_i, all relative to the
 * attracting centre, and μ in consistent units (AU, days, GM_sun for the heliocentric case; km, s, GM_earth for a
 * geocentric textbook case).
 *
 *   τ1 = t1 − t2, τ3 = t3 − t2, τ = τ3 − τ1;  p1 = ρ̂2×ρ̂3, p2 = ρ̂1×ρ̂3, p3 = ρ̂1×ρ̂2;  D0 = ρ̂1·p1, Dij = Ri·pj
 *   A = (−D12 τ3/τ + D22 + D32 τ1/τ)/D0,  B = (D12 (τ3²−τ²) τ3/τ + D32 (τ²−τ1²) τ1/τ)/(6 D0),  E = R2·ρ̂2
 *   r2⁸ + a r2⁶ + b r2³ + c = 0,  a = −(A² + 2AE + R2²), b = −2μB(A+E), c = −μ²B²
 *
 * EVERY positive real root with a positive range ρ2 = A + μB/r2³ (and ρ1, ρ3 > 0) is kept (up to three,
 * Charlier; METHODS §9.3); the caller picks among them by the residuals of the other observations (fit.ts).
 * Roots: the polynomial is scanned on a logarithmic grid up to the Fujiwara bound 2·max|a_k|^(1/k) and every sign
 * change is refined by bisection (a double root touching zero without a sign change is a measure-zero case and is
 * not searched for).
 *
 * Improvement (Curtis Alg. 5.6): with r2, v2 the exact Lagrange f, g over τ1 and τ3 come from the universal-variable
 * Kepler solution (twobody/universal.ts, no series truncation), averaged with the previous values as Curtis does
 * for stability, then
 *   c1 = g3/(f1 g3 − f3 g1), c3 = −g1/(f1 g3 − f3 g1),
 *   ρ1 = (−D11 + D21/c1 − c3 D31/c1)/D0, ρ2 = (−c1 D12 + D22 − c3 D32)/D0, ρ3 = (−c1 D13/c3 + D23/c3 − D33)/D0,
 *   v2 = (−f3 r1 + f1 r3)/(f1 g3 − f3 g1),
 * with each time corrected for light travel t_i − ρ_i/c (METHODS §9.3) when a speed of light is given. The state
 * returned refers to the light-time-corrected time of the middle observation.
 *
 * The iteration is a fixed-point map; near-singular geometries (two roots close together, objects far beyond the
 * Sun) make it oscillate. It is under-relaxed when its steps grow, and when it still does not converge in
 * maxIterations (or ends with a negative range) the exact two-body problem through the three lines of sight is
 * solved by Newton's method from the plain Gauss state (refineExact below: unknowns ρ2 and v2, equations the
 * perpendicular components of the outer lines of sight, light time included). Roots leading to the same orbit are
 * reported once.
 *
 * Degenerate geometry: |D0| (the triple product of the unit lines of sight) below DEGENERATE_D0 means nearly
 * great-circle motion or a too-short arc; GaussError says so.
 */
import type { Vec3 } from '../vec';
import { add, cross, dot, norm, scale } from '../vec';
import { keplerUniversal } from '../twobody/universal';

export const DEGENERATE_D0 = 1e-14;

export class GaussError extends Error {
  constructor(
    readonly code: 'DEGENERATE_GEOMETRY' | 'NO_ADMISSIBLE_ROOT' | 'INVALID_INPUT',
    message: string,
  ) {
    super(message);
    this.name = 'GaussError';
  }
}

export interface GaussObservation {
  /** observation time (time unit of μ) */
  time: number;
  /** observer position relative to the attracting centre (length unit of μ) */
  observerPosition: Vec3;
  /** unit vector of the line of sight */
  lineOfSight: Vec3;
}

export interface GaussOptions {
  mu: number;
  /** speed of light in the units of μ for the light-time correction of the times; null/undefined: no correction */
  speedOfLight?: number | null;
  /** improvement iterations (default 50); 0 gives the plain Gauss solution */
  maxIterations?: number;
  /** relative change of the three ranges below which the improvement stops (default 1e-12) */
  tolerance?: number;
}

export interface GaussSolution {
  /** the root r2 of the 8th-degree polynomial this solution started from */
  rootR2: number;
  /** state of the middle observation (at epoch, below) */
  position: Vec3;
  velocity: Vec3;
  /** time the state refers to: t2 − ρ2/c (t2 without light-time correction) */
  epoch: number;
  /** slant ranges ρ1, ρ2, ρ3 */
  ranges: [number, number, number];
  /** state from the plain Gauss step before the improvement */
  initial: { position: Vec3; velocity: Vec3; ranges: [number, number, number] };
  iterations: number;
  converged: boolean;
}

export interface GaussResult {
  /** every positive real root of the polynomial */
  roots: number[];
  /** the roots that give positive ranges ρ1, ρ2, ρ3 (admissible, METHODS §9.3) */
  admissibleRoots: number[];
  /** solutions from the admissible roots (positive ranges), best-conditioned first is not implied: in root order */
  solutions: GaussSolution[];
  d0: number;
}

/** All positive real roots of r⁸ + a r⁶ + b r³ + c. */
export function gaussPolynomialRoots(a: number, b: number, c: number): number[] {
  const f = (r: number) => {
    const r3 = r * r * r;
    return r3 * r3 * r * r + a * r3 * r3 + b * r3 + c;
  };
  // Fujiwara bound on the root moduli of x⁸ + a x⁶ + b x³ + c: 2 max(|a|^(1/2), |b|^(1/5), |c|^(1/8))
  const bound = 2 * Math.max(Math.sqrt(Math.abs(a)), Math.pow(Math.abs(b), 1 / 5), Math.pow(Math.abs(c), 1 / 8));
  if (!(bound > 0)) return [];
  const roots: number[] = [];
  const steps = 4000;
  const lo = bound * 1e-8;
  const ratio = Math.pow(bound / lo, 1 / steps);
  let x0 = lo;
  let f0 = f(x0);
  for (let k = 1; k <= steps; k++) {
    const x1 = k === steps ? bound * (1 + 1e-12) : x0 * ratio;
    const f1 = f(x1);
    if (f0 === 0) roots.push(x0);
    else if (f0 * f1 < 0) {
      let l = x0, h = x1, fl = f0;
      for (let it = 0; it < 200; it++) {
        const mid = 0.5 * (l + h);
        const fm = f(mid);
        if (fm === 0) { l = h = mid; break; }
        if (fm * fl < 0) h = mid;
        else { l = mid; fl = fm; }
        if (h - l <= 1e-15 * h) break;
      }
      roots.push(0.5 * (l + h));
    }
    x0 = x1;
    f0 = f1;
  }
  return roots;
}

/** Gauss's method for three observations (ordered in time). */
export function gaussMethod(observations: readonly GaussObservation[], options: GaussOptions): GaussResult {
  if (observations.length !== 3) throw new GaussError('INVALID_INPUT', `Gauss's method needs exactly 3 observations, got ${observations.length}`);
  const mu = options.mu;
  if (!(mu > 0)) throw new GaussError('INVALID_INPUT', `mu must be > 0, got ${mu}`);
  const [o1, o2, o3] = observations;
  if (!(o1.time < o2.time && o2.time < o3.time)) {
    throw new GaussError('INVALID_INPUT', 'the three observation times must be distinct and increasing');
  }
  const L = observations.map((o) => {
    const n = norm(o.lineOfSight);
    if (!(n > 0)) throw new GaussError('INVALID_INPUT', 'a line of sight is the zero vector');
    return scale(o.lineOfSight, 1 / n);
  }) as [Vec3, Vec3, Vec3];
  const R = observations.map((o) => o.observerPosition) as [Vec3, Vec3, Vec3];
  const p1 = cross(L[1], L[2]);
  const p2 = cross(L[0], L[2]);
  const p3 = cross(L[0], L[1]);
  const D0 = dot(L[0], p1);
  if (!(Math.abs(D0) > DEGENERATE_D0)) {
    throw new GaussError(
      'DEGENERATE_GEOMETRY',
      `degenerate geometry: the three lines of sight are nearly coplanar with the observer (D0 = ${D0.toExponential(2)}); ` +
        'the motion is too close to a great circle or the arc is too short for Gauss\'s method',
    );
  }
  const P = [p1, p2, p3];
  const D = R.map((Ri) => P.map((pj) => dot(Ri, pj))); // D[i][j] = Ri·pj (0-based)
  const c = options.speedOfLight ?? null;
  const maxIt = options.maxIterations ?? 50;
  const tol = options.tolerance ?? 1e-12;

  const tau1 = o1.time - o2.time;
  const tau3 = o3.time - o2.time;
  const tau = tau3 - tau1;
  const A = (-D[0][1] * (tau3 / tau) + D[1][1] + D[2][1] * (tau1 / tau)) / D0;
  const B = (D[0][1] * (tau3 * tau3 - tau * tau) * (tau3 / tau) + D[2][1] * (tau * tau - tau1 * tau1) * (tau1 / tau)) / (6 * D0);
  const E = dot(R[1], L[1]);
  const R2sq = dot(R[1], R[1]);
  const a = -(A * A + 2 * A * E + R2sq);
  const b = -2 * mu * B * (A + E);
  const cc = -mu * mu * B * B;
  const roots = gaussPolynomialRoots(a, b, cc);

  const solutions: GaussSolution[] = [];
  const admissibleRoots: number[] = [];
  for (const r2 of roots) {
    const r23 = r2 * r2 * r2;
    const rho2 = A + (mu * B) / r23;
    const rho1 =
      ((6 * (D[2][0] * (tau1 / tau3) + D[1][0] * (tau / tau3)) * r23 + mu * D[2][0] * (tau * tau - tau1 * tau1) * (tau1 / tau3)) /
        (6 * r23 + mu * (tau * tau - tau3 * tau3)) -
        D[0][0]) /
      D0;
    const rho3 =
      ((6 * (D[0][2] * (tau3 / tau1) - D[1][2] * (tau / tau1)) * r23 + mu * D[0][2] * (tau * tau - tau3 * tau3) * (tau3 / tau1)) /
        (6 * r23 + mu * (tau * tau - tau1 * tau1)) -
        D[2][2]) /
      D0;
    if (!(rho1 > 0 && rho2 > 0 && rho3 > 0)) continue;
    admissibleRoots.push(r2);
    let f1 = 1 - (mu * tau1 * tau1) / (2 * r23);
    let f3 = 1 - (mu * tau3 * tau3) / (2 * r23);
    let g1 = tau1 - (mu * tau1 * tau1 * tau1) / (6 * r23);
    let g3 = tau3 - (mu * tau3 * tau3 * tau3) / (6 * r23);
    let rho: [number, number, number] = [rho1, rho2, rho3];
    const stateFrom = (rh: [number, number, number]) => {
      const r1v = add(R[0], scale(L[0], rh[0]));
      const r2v = add(R[1], scale(L[1], rh[1]));
      const r3v = add(R[2], scale(L[2], rh[2]));
      const den = f1 * g3 - f3 * g1;
      const v2: Vec3 = [(-f3 * r1v[0] + f1 * r3v[0]) / den, (-f3 * r1v[1] + f1 * r3v[1]) / den, (-f3 * r1v[2] + f1 * r3v[2]) / den];
      return { r2v, v2 };
    };
    let { r2v, v2 } = stateFrom(rho);
    const initial = { position: r2v, velocity: v2, ranges: [...rho] as [number, number, number] };
    let converged = maxIt === 0;
    let iterations = 0;
    let ok = true;
    let lambda = 1;
    let lastChange = Infinity;
    for (let it = 1; it <= maxIt; it++) {
      iterations = it;
      // light-time-corrected intervals
      const t1 = c ? o1.time - rho[0] / c : o1.time;
      const t2 = c ? o2.time - rho[1] / c : o2.time;
      const t3 = c ? o3.time - rho[2] / c : o3.time;
      const ta1 = t1 - t2;
      const ta3 = t3 - t2;
      let k1, k3;
      try {
        k1 = keplerUniversal(r2v, v2, ta1, mu);
        k3 = keplerUniversal(r2v, v2, ta3, mu);
      } catch {
        ok = false;
        break;
      }
      f1 = (f1 + k1.f) / 2;
      g1 = (g1 + k1.g) / 2;
      f3 = (f3 + k3.f) / 2;
      g3 = (g3 + k3.g) / 2;
      const den = f1 * g3 - f3 * g1;
      const c1 = g3 / den;
      const c3 = -g1 / den;
      const n1 = (-D[0][0] + D[1][0] / c1 - (c3 * D[2][0]) / c1) / D0;
      const n2 = (-c1 * D[0][1] + D[1][1] - c3 * D[2][1]) / D0;
      const n3 = ((-c1 * D[0][2]) / c3 + D[1][2] / c3 - D[2][2]) / D0;
      const next: [number, number, number] = [n1, n2, n3];
      if (!next.every((x) => Number.isFinite(x))) {
        ok = false;
        break;
      }
      const change = Math.max(...next.map((x, i) => Math.abs(x - rho[i]) / Math.max(Math.abs(x), 1e-300)));
      // Under-relaxation when the iteration oscillates with growing steps (near-singular geometry, e.g. two
      // roots close together): halve the step fraction each time the change grows (common practice, no source).
      if (change > lastChange) lambda = Math.max(lambda / 2, 1 / 1024);
      lastChange = change;
      rho = [rho[0] + lambda * (next[0] - rho[0]), rho[1] + lambda * (next[1] - rho[1]), rho[2] + lambda * (next[2] - rho[2])];
      ({ r2v, v2 } = stateFrom(rho));
      if (change < tol) {
        converged = true;
        break;
      }
    }
    if (!converged || !ok || !(rho[0] > 0 && rho[1] > 0 && rho[2] > 0)) {
      // The fixed-point iteration failed (near-singular geometry): solve the exact two-body problem by Newton
      // from the plain Gauss state instead.
      const exact = refineExact(observations, L, initial.position, initial.velocity, mu, c, tol);
      if (exact) {
        r2v = exact.position;
        v2 = exact.velocity;
        rho = exact.ranges;
        ok = true;
        converged = true;
        iterations += exact.iterations;
      }
    }
    if (!ok || !(rho[0] > 0 && rho[1] > 0 && rho[2] > 0) || ![...r2v, ...v2].every(Number.isFinite)) continue;
    // two roots can lead to the same orbit (the Newton fallback converges to the nearest exact solution)
    const dup = solutions.some((o) => Math.hypot(o.position[0] - r2v[0], o.position[1] - r2v[1], o.position[2] - r2v[2]) <= 1e-8 * norm(r2v));
    if (dup) continue;
    solutions.push({
      rootR2: r2,
      position: r2v,
      velocity: v2,
      epoch: c ? o2.time - rho[1] / c : o2.time,
      ranges: rho,
      initial,
      iterations,
      converged,
    });
  }
  return { roots, admissibleRoots, solutions, d0: D0 };
}

/**
 * Exact two-body solution through the three lines of sight by Newton's method (fallback of the Curtis iteration):
 * unknowns the middle range ρ2 and the velocity v2 (4 values), equations the two components of each outer line of
 * sight perpendicular to the observed direction (4 values), with light time. Jacobian by forward differences.
 */
function refineExact(
  obs: readonly GaussObservation[],
  L: [Vec3, Vec3, Vec3],
  r2: Vec3,
  v2: Vec3,
  mu: number,
  c: number | null,
  tol: number,
): { position: Vec3; velocity: Vec3; ranges: [number, number, number]; iterations: number } | null {
  const R = obs.map((o) => o.observerPosition);
  // two unit vectors perpendicular to each outer line of sight
  const perp = [L[0], L[2]].map((l) => {
    const a: Vec3 = Math.abs(l[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
    const e1 = cross(l, a);
    const n1 = norm(e1);
    const u1: Vec3 = [e1[0] / n1, e1[1] / n1, e1[2] / n1];
    return [u1, cross(l, u1)] as [Vec3, Vec3];
  });
  const evalAt = (x: number[]): { g: number[]; ranges: [number, number, number]; pos: Vec3; vel: Vec3; t2: number } | null => {
    const pos = add(R[1], scale(L[1], x[0]));
    const vel: Vec3 = [x[1], x[2], x[3]];
    const t2 = c ? obs[1].time - x[0] / c : obs[1].time;
    const g: number[] = [];
    const ranges: [number, number, number] = [0, x[0], 0];
    for (const [k, idx] of [[0, 0], [1, 2]] as const) {
      let lt = 0;
      let rel: Vec3 = [0, 0, 0];
      for (let it = 0; it < (c ? 4 : 1); it++) {
        let p;
        try {
          p = keplerUniversal(pos, vel, obs[idx].time - lt - t2, mu);
        } catch {
          return null;
        }
        rel = [p.r[0] - R[idx][0], p.r[1] - R[idx][1], p.r[2] - R[idx][2]];
        if (c) lt = norm(rel) / c;
      }
      const d = norm(rel);
      ranges[idx] = d;
      g.push(dot(rel, perp[k][0]) / d, dot(rel, perp[k][1]) / d);
    }
    return g.every(Number.isFinite) ? { g, ranges, pos, vel, t2 } : null;
  };
  let x = [dot(sub3(r2, R[1]), L[1]), v2[0], v2[1], v2[2]];
  let cur = evalAt(x);
  if (!cur) return null;
  const size = (g: number[]) => Math.hypot(...g);
  for (let it = 1; it <= 60; it++) {
    const J: number[][] = [[], [], [], []];
    for (let k = 0; k < 4; k++) {
      const h = k === 0 ? 1e-7 * Math.max(Math.abs(x[0]), 1e-3) : 1e-7 * Math.max(Math.hypot(x[1], x[2], x[3]), 1e-12);
      const xp = [...x];
      xp[k] += h;
      const e = evalAt(xp);
      if (!e) return null;
      for (let r = 0; r < 4; r++) J[r][k] = (e.g[r] - cur.g[r]) / h;
    }
    const dx = solve4(J, cur.g.map((v) => -v));
    if (!dx) return null;
    let f = 1;
    let next = null;
    for (let h = 0; h < 30; h++) {
      const xn = x.map((v, k) => v + f * dx[k]);
      const e = xn[0] > 0 ? evalAt(xn) : null;
      if (e && size(e.g) < size(cur.g)) {
        next = { xn, e };
        break;
      }
      f /= 2;
    }
    if (!next) return size(cur.g) < 1e-12 ? { position: cur.pos, velocity: cur.vel, ranges: cur.ranges, iterations: it } : null;
    x = next.xn;
    cur = next.e;
    if (size(cur.g) < 1e-14 || Math.abs(f * dx[0]) < tol * Math.abs(x[0])) {
      return { position: cur.pos, velocity: cur.vel, ranges: cur.ranges, iterations: it };
    }
  }
  return null;
}

function sub3(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

/** 4x4 linear solve by Gaussian elimination with partial pivoting; null if singular. */
function solve4(A: number[][], b: number[]): number[] | null {
  const n = 4;
  const M = A.map((row, i) => [...row, b[i]]);
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(M[r][col]) > Math.abs(M[piv][col])) piv = r;
    if (!(Math.abs(M[piv][col]) > 0)) return null;
    [M[col], M[piv]] = [M[piv], M[col]];
    for (let r = col + 1; r < n; r++) {
      const f = M[r][col] / M[col][col];
      for (let k = col; k <= n; k++) M[r][k] -= f * M[col][k];
    }
  }
  const x = new Array(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let v = M[r][n];
    for (let k = r + 1; k < n; k++) v -= M[r][k] * x[k];
    x[r] = v / M[r][r];
  }
  return x.every(Number.isFinite) ? x : null;
}
