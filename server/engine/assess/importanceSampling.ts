/**
 * Importance-sampled Monte Carlo for small impact probabilities (a check of the linear and LOV methods in the tail,
 * where plain Monte Carlo would need ~100/IP clones).
 *
 * Estimator (standard importance sampling; common practice, no source; e.g. Robert & Casella, Monte Carlo
 * Statistical Methods, 2nd ed. 2004, ch. 3 — cited as recalled from memory): with the solution's Gaussian p and a
 * proposal q that is positive wherever p is,
 *   IP = E_p[hit(x)] = E_q[w(x) hit(x)],   w = p/q,
 *   estimate = (1/N) sum_i w_i hit_i,  x_i ~ q,
 * its standard error from the sample variance of w hit. The proposal here is a mixture of Gaussians sampled
 * deterministically (component j gets a fixed share n_j = alpha_j N of the clones, the weight uses the whole
 * mixture density q = sum_j alpha_j q_j: the "deterministic mixture" estimator, unbiased; recalled from memory,
 * Owen & Zhou 2000, JASA 95, 135); its standard error is then sqrt(sum_j n_j s_j^2) / N with s_j^2 the sample
 * variance of w hit within component j (one component: the usual s / sqrt(N)).
 * Effective sample size: Kish's (sum v)^2 / sum v^2 (recalled from memory, Kish 1965), reported for v = w hit
 * (the effective number of hits: (estimate / s.e.)^2 for iid draws up to the (N-1)/N factor) and for the raw
 * weights (how far q is from p; tiny by design in a rare-event proposal).
 *
 * Log-densities: log N(x; m, Gamma) = -|y|^2/2 - sum log L_ii - (n/2) log 2 pi with L y = x - m (forward
 * substitution on the Cholesky factor, no inverse).
 *
 * Proposal for an impact region (diskDesignPointGaussian): linearise the b-plane map at a point x_c of the
 * parameter space (the nominal for the linear method's view, the virtual impactor of the LOV for the LOV's view):
 * b(x) = b_c + B_J (x - x_c). In whitened coordinates z (x - x_nominal = L z, L L^T = Gamma, z ~ N(0, I)) the map
 * depends on z only through u = V^T z (V: the two right singular vectors of M = B_J L), b = b_bar + U S u. The most
 * probable impacting point ("design point", common practice in rare-event sampling, no source) is the point u_d of
 * the capture disk's image closest to the origin. With a b-plane ellipse far longer than wide, that image is a thin
 * cap around the axis e_n = image of the disk's inward normal at the design point (not u_d/|u_d|, which leans
 * along the trace by the along-trace offset). The proposal is N(V (u_d + shift e_n), Sigma_z) in z: unit variance
 * along e_n (the target's, so the weight falls off into the disk like exp(-beta depth)), a narrow variance s_t^2
 * across it (s_t = half the cap's half-width at depth `capDepth`), and the target's unit variance in the n - 2
 * directions the map ignores. The proposal only needs to cover the impact region; a wrong linearisation costs
 * efficiency (visible in the s.e. and the ESS), not bias (a Gaussian is positive everywhere).
 *
 * Propagation (runImportanceSampling): each component is a McTask (jobs/mc-task.ts) with the component's mean
 * and Cholesky factor, so clones are drawn, propagated with the full dynamics (lockstep batches, assess/batch.ts)
 * and their impacts detected by exactly the code of the plain Monte Carlo (montecarlo.ts); clone k's state is
 * redrawn with the same drawClone(task, k) to compute its weight. Hit = the clone reached a monitored body's
 * surface (an approach record with impact = true, as montecarlo.ts counts), optionally restricted to a body and a
 * time window.
 */
import type { CloseApproach } from '../dynamics';
import type { PlanetEphemeris } from '../dynamics/types';
import { EPHEMERIS_BODIES, type EphemerisBody } from '../ephemeris';
import type { ChebyshevEphemerisData } from '../ephemeris/chebyshev';
import { drawClone, runMcTask, type McTask, type McTaskResult } from '../jobs/mc-task';
import type { McPool } from '../jobs/pool';
import { scaledCholesky } from '../linalg';
import { approachesOf, bPlaneJacobianAt, captureRadiusFor, displace, type LinearContext } from './linear';
import { principalAxes2 } from '../risk/linear-ip';
import { RandomStream } from '../risk/random';
import { drawGaussian } from '../risk/sampling';

const LOG_2PI = Math.log(2 * Math.PI);

/** A multivariate normal N(mean, L L^T), row-major n x n lower factor. */
export type Gaussian = { n: number; mean: Float64Array; lower: Float64Array; logDetHalf: number };

/** N(mean, covariance) from a row-major covariance; the factor is the scaled Cholesky (linalg). */
export function gaussian(mean: ArrayLike<number>, covariance: ArrayLike<number>, n = mean.length): Gaussian {
  if (covariance.length !== n * n) throw new RangeError(`covariance must be ${n} x ${n}`);
  const f = scaledCholesky(Float64Array.from(covariance), n);
  if (!f) throw new RangeError('covariance is not positive definite');
  return gaussianFromLower(mean, f.l, n);
}

/** N(mean, L L^T) from a lower-triangular factor. */
export function gaussianFromLower(mean: ArrayLike<number>, lower: ArrayLike<number>, n = mean.length): Gaussian {
  let logDetHalf = 0;
  for (let i = 0; i < n; i++) {
    const d = lower[i * n + i];
    if (!(d > 0)) throw new RangeError('Cholesky factor must have a positive diagonal');
    logDetHalf += Math.log(d);
  }
  return { n, mean: Float64Array.from(mean), lower: Float64Array.from(lower), logDetHalf };
}

/** Solve L y = x - mean (forward substitution); y written to out. */
export function whiten(g: Gaussian, x: ArrayLike<number>, out = new Float64Array(g.n)): Float64Array {
  const { n, lower: L, mean } = g;
  for (let i = 0; i < n; i++) {
    let s = x[i] - mean[i];
    for (let k = 0; k < i; k++) s -= L[i * n + k] * out[k];
    out[i] = s / L[i * n + i];
  }
  return out;
}

/** log N(x; mean, L L^T). */
export function gaussianLogDensity(g: Gaussian, x: ArrayLike<number>, scratch = new Float64Array(g.n)): number {
  const y = whiten(g, x, scratch);
  let q = 0;
  for (let i = 0; i < g.n; i++) q += y[i] * y[i];
  return -0.5 * q - g.logDetHalf - 0.5 * g.n * LOG_2PI;
}

export type MixtureComponent = { weight: number; gaussian: Gaussian };

/** log sum_j alpha_j N(x; m_j, Gamma_j) (log-sum-exp); the alphas are normalised here. */
export function mixtureLogDensity(components: readonly MixtureComponent[], x: ArrayLike<number>): number {
  const total = components.reduce((s, c) => s + c.weight, 0);
  const terms = components.map((c) => Math.log(c.weight / total) + gaussianLogDensity(c.gaussian, x));
  const top = Math.max(...terms);
  if (top === -Infinity) return -Infinity;
  return top + Math.log(terms.reduce((s, t) => s + Math.exp(t - top), 0));
}

/** Clones per component for a deterministic mixture of N draws (largest remainder; every share is >= 1). */
export function allocateMixture(components: readonly { weight: number }[], clones: number): number[] {
  const total = components.reduce((s, c) => s + c.weight, 0);
  if (!(total > 0) || components.some((c) => !(c.weight > 0))) throw new RangeError('mixture weights must be positive');
  if (!Number.isInteger(clones) || clones < components.length) throw new RangeError(`need at least one clone per component, got ${clones}`);
  const exact = components.map((c) => (c.weight / total) * clones);
  const counts = exact.map((e) => Math.max(1, Math.floor(e)));
  let left = clones - counts.reduce((s, c) => s + c, 0);
  const order = exact.map((e, j) => ({ j, r: e - Math.floor(e) })).sort((a, b) => b.r - a.r);
  for (let i = 0; left > 0; i = (i + 1) % order.length, left--) counts[order[i].j]++;
  for (let j = counts.length - 1; left < 0; j = (j + counts.length - 1) % counts.length) if (counts[j] > 1) { counts[j]--; left++; }
  return counts;
}

/** The mixture weights actually used by a deterministic allocation: alpha_j = n_j / N. */
export function realisedMixture(components: readonly MixtureComponent[], counts: readonly number[]): MixtureComponent[] {
  const N = counts.reduce((s, c) => s + c, 0);
  return components.map((c, j) => ({ weight: counts[j] / N, gaussian: c.gaussian }));
}

export type ImportanceEstimate = {
  /** (1/N) sum w_i hit_i. */
  estimate: number;
  /** Standard error of the estimate (stratified by component when strata are given). */
  standardError: number;
  relativeError: number;
  /** Kish ESS of the values w hit (the effective number of hits). */
  ess: number;
  /** Kish ESS of all the weights. */
  essWeights: number;
  samples: number;
  hits: number;
  /** Largest w among the hits, relative to the estimate (a single clone's share of the answer x N). */
  maxHitWeight: number;
  /** Plain Monte Carlo's standard error at this sample size and probability: sqrt(p (1 - p) / N). */
  plainStandardError: number;
};

/**
 * Estimate from per-clone log-weights and hits. `stratum[i]` (optional) is the mixture component clone i was
 * drawn from under a deterministic allocation; the standard error then sums the within-component variances.
 */
export function importanceEstimate(logWeight: ArrayLike<number>, hit: ArrayLike<boolean | number>, stratum?: ArrayLike<number>): ImportanceEstimate {
  const N = logWeight.length;
  if (N === 0 || hit.length !== N || (stratum && stratum.length !== N)) throw new RangeError('importanceEstimate: need equal, non-empty arrays');
  const v = new Float64Array(N);
  let sum = 0, sum2 = 0, hits = 0, sw = 0, sw2 = 0, maxW = 0;
  for (let i = 0; i < N; i++) {
    const w = Math.exp(logWeight[i]);
    sw += w;
    sw2 += w * w;
    if (hit[i]) {
      v[i] = w;
      hits++;
      if (w > maxW) maxW = w;
    }
    sum += v[i];
    sum2 += v[i] * v[i];
  }
  const estimate = sum / N;
  const groups = new Map<number, number[]>();
  for (let i = 0; i < N; i++) {
    const k = stratum ? stratum[i] : 0;
    let g = groups.get(k);
    if (!g) groups.set(k, (g = []));
    g.push(v[i]);
  }
  let varSum = 0;
  for (const g of groups.values()) {
    const m = g.length;
    if (m < 2) continue;
    const mean = g.reduce((s, x) => s + x, 0) / m;
    const s2 = g.reduce((s, x) => s + (x - mean) ** 2, 0) / (m - 1);
    varSum += m * s2;
  }
  const standardError = Math.sqrt(varSum) / N;
  return {
    estimate,
    standardError,
    relativeError: estimate > 0 ? standardError / estimate : Infinity,
    ess: sum2 > 0 ? (sum * sum) / sum2 : 0,
    essWeights: sw2 > 0 ? (sw * sw) / sw2 : 0,
    samples: N,
    hits,
    maxHitWeight: estimate > 0 ? maxW / (N * estimate) : 0,
    plainStandardError: Math.sqrt((estimate * (1 - Math.min(1, estimate))) / N),
  };
}

/** Draw clone k of a component (stream RandomStream.forClone(seed, k), x = mean + L z). */
export function drawFrom(g: Gaussian, seed: number, k: number, out = new Float64Array(g.n)): Float64Array {
  return drawGaussian(g.mean, g.lower, g.n, RandomStream.forClone(seed, k), out);
}

/**
 * Importance sampling with a pure-function hit (for tests and analytic maps): clones 0..N-1, component j gets the
 * contiguous block of n_j indices, clone k drawn with drawFrom(component, seed, k).
 */
export function importanceSample(target: Gaussian, proposal: readonly MixtureComponent[], clones: number, seed: number, hit: (x: Float64Array) => boolean): ImportanceEstimate & { counts: number[] } {
  const counts = allocateMixture(proposal, clones);
  const mix = realisedMixture(proposal, counts);
  const logW = new Float64Array(clones), hits = new Uint8Array(clones), strata = new Int32Array(clones);
  const x = new Float64Array(target.n);
  let k = 0;
  counts.forEach((m, j) => {
    for (let i = 0; i < m; i++, k++) {
      drawFrom(proposal[j].gaussian, seed, k, x);
      hits[k] = hit(x) ? 1 : 0;
      logW[k] = gaussianLogDensity(target, x) - mixtureLogDensity(mix, x);
      strata[k] = j;
    }
  });
  return { ...importanceEstimate(logW, hits, strata), counts };
}

export type DesignPointInput = {
  /** Covariance of the solution (n x n, row-major) in the parameters of the displacements below. */
  covariance: ArrayLike<number>;
  n: number;
  /** Linearisation point: displacement from the nominal solution (parameter units). */
  pointDelta: ArrayLike<number>;
  /** b-plane point of the linearisation point's encounter, km. */
  bPlaneKm: [number, number];
  /** d(xi, zeta)/dx at the linearisation point, 2 x n row-major (km per parameter unit). */
  bJacobian: ArrayLike<number>;
  captureRadiusKm: number;
  /** Depth (in u) of the disk cap the along-edge width is sized on (default 3). */
  capDepth?: number;
  /** Shift of the proposal mean beyond the design point, across the edge, in sigmas (default 0). */
  normalShift?: number;
};

export type DesignPointProposal = {
  /** Proposal for the displacement from the nominal: mean and covariance (row-major). */
  meanDelta: Float64Array;
  covariance: Float64Array;
  /** |u_d|: the design point's distance from the nominal in sigmas (linearised). */
  beta: number;
  /** Design point on the b-plane, km, and the along-edge proposal width in u. */
  designBPlaneKm: [number, number];
  alongEdgeSigma: number;
  /** b-plane point the linearisation puts the nominal at, km. */
  nominalImageKm: [number, number];
};

/** Design-point proposal for a disk of the b-plane (see module comment). Throws when the nominal image is inside the disk. */
export function diskDesignPointGaussian(p: DesignPointInput): DesignPointProposal {
  const { n, captureRadiusKm: R } = p;
  const f = scaledCholesky(Float64Array.from(p.covariance), n);
  if (!f) throw new RangeError('covariance is not positive definite');
  const L = f.l;
  const BJ = p.bJacobian;
  // M = B_J L (2 x n), b_bar = b_c - B_J x_c.
  const M = new Float64Array(2 * n);
  for (let r = 0; r < 2; r++) for (let j = 0; j < n; j++) {
    let s = 0;
    for (let k = j; k < n; k++) s += BJ[r * n + k] * L[k * n + j];
    M[r * n + j] = s;
  }
  const bBar: [number, number] = [0, 1].map((r) => {
    let s = p.bPlaneKm[r];
    for (let j = 0; j < n; j++) s -= BJ[r * n + j] * p.pointDelta[j];
    return s;
  }) as [number, number];
  if (Math.hypot(bBar[0], bBar[1]) <= R) throw new RangeError('the linearised nominal is inside the disk: no tail to sample');
  const gb = [[0, 0], [0, 0]];
  for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += M[a * n + j] * M[b * n + j];
    gb[a][b] = s;
  }
  const ax = principalAxes2(gb);
  const c = Math.cos(ax.angleRad), s = Math.sin(ax.angleRad);
  const U = [[c, s], [-s, c]]; // rows: major, minor directions on the b-plane
  const S = [ax.sigmaMajor, ax.sigmaMinor];
  // V columns (n x 2): M^T U_k / S_k, re-orthonormalised.
  const V = [0, 1].map((k) => {
    const v = new Float64Array(n);
    for (let j = 0; j < n; j++) v[j] = (U[k][0] * M[j] + U[k][1] * M[n + j]) / S[k];
    return v;
  });
  const dot = (a: Float64Array, b: Float64Array) => a.reduce((acc, x, i) => acc + x * b[i], 0);
  const d01 = dot(V[0], V[1]);
  for (let j = 0; j < n; j++) V[1][j] -= d01 * V[0][j];
  for (const v of V) {
    const nv = Math.sqrt(dot(v, v));
    for (let j = 0; j < n; j++) v[j] /= nv;
  }
  const uOf = (th: number): [number, number] => {
    const dx = R * Math.cos(th) - bBar[0], dz = R * Math.sin(th) - bBar[1];
    return [(U[0][0] * dx + U[0][1] * dz) / S[0], (U[1][0] * dx + U[1][1] * dz) / S[1]];
  };
  const beta2 = (th: number) => { const u = uOf(th); return u[0] * u[0] + u[1] * u[1]; };
  // Scan the edge, then golden-section refine around the best sample.
  const scan = 72000;
  let best = 0, bestV = Infinity;
  for (let i = 0; i < scan; i++) {
    const th = (2 * Math.PI * i) / scan;
    const v = beta2(th);
    if (v < bestV) { bestV = v; best = th; }
  }
  let lo = best - (2 * Math.PI) / scan, hi = best + (2 * Math.PI) / scan;
  const gr = (Math.sqrt(5) - 1) / 2;
  for (let it = 0; it < 80; it++) {
    const a = hi - gr * (hi - lo), b = lo + gr * (hi - lo);
    if (beta2(a) < beta2(b)) hi = b; else lo = a;
  }
  const thD = 0.5 * (lo + hi);
  const uD = uOf(thD);
  const beta = Math.hypot(uD[0], uD[1]);
  // Axis of the disk's cap in u: the image of the disk's inward normal at the design point (the impact region is
  // a thin cap around it when the b-plane ellipse is much longer than it is wide); e_t across it.
  const bD: [number, number] = [R * Math.cos(thD), R * Math.sin(thD)];
  const ia = [(-U[0][0] * bD[0] - U[0][1] * bD[1]) / (R * S[0]), (-U[1][0] * bD[0] - U[1][1] * bD[1]) / (R * S[1])];
  const ian = Math.hypot(ia[0], ia[1]);
  const en = [ia[0] / ian, ia[1] / ian], et = [-en[1], en[0]];
  // Half-width (along e_t) of the cap at depth capDepth (along e_n) beyond the design point, both sides.
  const depth = p.capDepth ?? 3;
  const halfWidth = (dir: number) => {
    let th = thD, step = 1e-9, u = uD;
    for (let i = 0; i < 2000; i++) {
      const t2 = th + dir * step;
      const u2 = uOf(t2);
      if (en[0] * (u2[0] - uD[0]) + en[1] * (u2[1] - uD[1]) >= depth) return Math.abs(et[0] * (u2[0] - uD[0]) + et[1] * (u2[1] - uD[1]));
      th = t2; u = u2; step *= 1.02;
      if (Math.abs(th - thD) > Math.PI) break;
    }
    return Math.abs(et[0] * (u[0] - uD[0]) + et[1] * (u[1] - uD[1]));
  };
  const st = Math.min(1, 0.5 * Math.max(halfWidth(1), halfWidth(-1)));
  // Proposal in z: mean V (u_d + shift e_n); covariance I - V V^T + V (e_n e_n^T + st^2 e_t e_t^T) V^T.
  const shift = p.normalShift ?? 0;
  const uMean = [uD[0] + shift * en[0], uD[1] + shift * en[1]];
  const A = [[en[0] * en[0] + st * st * et[0] * et[0], en[0] * en[1] + st * st * et[0] * et[1]], [0, 0]];
  A[1][0] = A[0][1];
  A[1][1] = en[1] * en[1] + st * st * et[1] * et[1];
  const zMean = new Float64Array(n);
  for (let j = 0; j < n; j++) zMean[j] = V[0][j] * uMean[0] + V[1][j] * uMean[1];
  const Sz = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let v = i === j ? 1 : 0;
    for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) v += V[a][i] * ((a === b ? -1 : 0) + A[a][b]) * V[b][j];
    Sz[i * n + j] = v;
  }
  // Back to parameter space: mean L z, covariance L Sz L^T.
  const meanDelta = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let k = 0; k <= i; k++) meanDelta[i] += L[i * n + k] * zMean[k];
  const LS = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let v = 0;
    for (let k = 0; k <= i; k++) v += L[i * n + k] * Sz[k * n + j];
    LS[i * n + j] = v;
  }
  const cov = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let v = 0;
    for (let k = 0; k <= j; k++) v += LS[i * n + k] * L[j * n + k];
    cov[i * n + j] = v;
  }
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) cov[i * n + j] = cov[j * n + i] = 0.5 * (cov[i * n + j] + cov[j * n + i]);
  return { meanDelta, covariance: cov, beta, designBPlaneKm: bD, alongEdgeSigma: st, nominalImageKm: bBar };
}

export type IsRunOptions = {
  /** Nominal parameters in MC_PARAMETERS order (x..vz, a1..a3) and the covariance's rows in that list. */
  nominal: number[];
  paramIndex: number[];
  fromTdbDays: number;
  untilTdbDays: number;
  bodies: EphemerisBody[];
  maxAu: number;
  tolerance?: number;
  fixedIterations?: number;
  batchSize?: number;
  seed: number;
  clones: number;
  nonGravLaw?: McTask['nonGravLaw'];
  nonGravMode?: McTask['nonGravMode'];
  /** Count only impacts on this body and in this TDB window (default: any impact). */
  hitBody?: EphemerisBody;
  hitWindowTdbDays?: [number, number];
  ephemeris: PlanetEphemeris;
  /** Run the batches on this pool (the tasks then carry the ephemeris as shared data). */
  pool?: McPool;
  sharedEphemeris?: ChebyshevEphemerisData;
  ephemerisSpan?: [number, number];
};

export type IsRunResult = ImportanceEstimate & { counts: number[]; hitsPerComponent: number[]; wallSeconds: number; steps: number };

/**
 * Importance sampling of the impact probability with the Monte Carlo's own clone code: target = N(nominal,
 * Gamma) on the covariance's parameters, proposal = the given mixture of Gaussians (means and covariances in the
 * same parameters, absolute values, not displacements).
 */
export async function runImportanceSampling(target: Gaussian, proposal: readonly MixtureComponent[], o: IsRunOptions): Promise<IsRunResult> {
  const t0 = performance.now();
  const counts = allocateMixture(proposal, o.clones);
  const mix = realisedMixture(proposal, counts);
  const batch = o.batchSize ?? 128;
  const tasks: McTask[] = [];
  const strataOf = new Int32Array(o.clones);
  let start = 0;
  counts.forEach((m, j) => {
    const g = proposal[j].gaussian;
    const nominal = [...o.nominal];
    o.paramIndex.forEach((pi, i) => (nominal[pi] = g.mean[i]));
    for (let k = start; k < start + m; k += batch) {
      tasks.push({
        ephemerisSpan: o.ephemerisSpan ?? [0, 0],
        ephemeris: o.pool ? o.sharedEphemeris : undefined,
        fromTdbDays: o.fromTdbDays,
        untilTdbDays: o.untilTdbDays,
        nominal,
        paramIndex: o.paramIndex,
        lower: Array.from(g.lower),
        nonGravLaw: o.nonGravLaw ?? 'inverse-square',
        nonGravMode: o.nonGravMode ?? 'none',
        seed: o.seed,
        cloneStart: k,
        cloneEnd: Math.min(start + m, k + batch),
        bodies: o.bodies,
        maxAu: o.maxAu,
        tolerance: o.tolerance ?? 1e-9,
        fixedIterations: o.fixedIterations ?? 2,
      });
    }
    strataOf.fill(j, start, start + m);
    start += m;
  });
  const results: McTaskResult[] = o.pool
    ? await Promise.all(tasks.map((t) => o.pool!.run(t)))
    : tasks.map((t) => runMcTask(t, o.ephemeris));
  const hit = new Uint8Array(o.clones);
  for (const r of results) {
    for (let i = 0; i < r.clone.length; i++) {
      if (r.impact[i] !== 1) continue;
      if (o.hitBody && r.body[i] !== EPHEMERIS_BODIES.indexOf(o.hitBody)) continue;
      if (o.hitWindowTdbDays && (r.tdbDays[i] < o.hitWindowTdbDays[0] || r.tdbDays[i] > o.hitWindowTdbDays[1])) continue;
      hit[r.clone[i]] = 1;
    }
  }
  // Weights from the drawn states (the same drawClone the task used).
  const n = o.paramIndex.length;
  const logW = new Float64Array(o.clones);
  const p9 = new Float64Array(9), x = new Float64Array(n);
  const scratch = { mean: new Float64Array(n), x: new Float64Array(n), z: new Float64Array(n) };
  for (const t of tasks) {
    for (let k = t.cloneStart; k < t.cloneEnd; k++) {
      drawClone(t, k, p9, scratch);
      for (let i = 0; i < n; i++) x[i] = p9[o.paramIndex[i]];
      logW[k] = gaussianLogDensity(target, x) - mixtureLogDensity(mix, x);
    }
  }
  const est = importanceEstimate(logW, hit, strataOf);
  const hitsPerComponent = counts.map(() => 0);
  for (let k = 0; k < o.clones; k++) if (hit[k]) hitsPerComponent[strataOf[k]]++;
  return {
    ...est,
    counts,
    hitsPerComponent,
    wallSeconds: (performance.now() - t0) / 1000,
    steps: results.reduce((s, r) => s + r.steps, 0),
  };
}

/**
 * diskDesignPointGaussian at a point of the parameter space given as a displacement from the nominal (zeros: the
 * nominal, i.e. the linear method's linearisation; sigma* dx/dsigma: an LOV virtual impactor's): the point is
 * propagated with the full dynamics, its encounter with `body` closest in time to `nearTdbDays` is taken, and its
 * b-plane Jacobian comes from the variational equations (linear.ts). The capture radius is that of the point's
 * own v_inf. Returns null when the point has no such encounter or no b-plane.
 */
export function designPointProposalAt(
  ctx: Pick<LinearContext, 'nominal' | 'covariance' | 'ephemeris' | 'untilTdbDays' | 'bodies' | 'maxAu' | 'tolerance'>,
  pointDelta: ArrayLike<number>,
  body: EphemerisBody,
  nearTdbDays: number,
  opts: { capDepth?: number; normalShift?: number } = {},
): (DesignPointProposal & { approach: CloseApproach; captureRadiusKm: number; bJacobian: Float64Array }) | null {
  const { nominal, covariance } = ctx;
  const point = displace(nominal, covariance.names, pointDelta);
  const list = approachesOf(point, ctx, ctx.untilTdbDays, Math.max(ctx.maxAu, 0.2)).filter((a) => a.body === body && a.bPlane);
  if (!list.length) return null;
  const a = list.reduce((p, q) => (Math.abs(q.tdbDays - nearTdbDays) < Math.abs(p.tdbDays - nearTdbDays) ? q : p));
  const capture = captureRadiusFor(body, a.vInfinityKmS);
  const jac = bPlaneJacobianAt(point, covariance.names, a, ctx.ephemeris, ctx.tolerance);
  if (!jac || capture === null) return null;
  const dp = diskDesignPointGaussian({
    covariance: covariance.matrix,
    n: covariance.n,
    pointDelta,
    bPlaneKm: [a.bPlane!.xiKm, a.bPlane!.zetaKm],
    bJacobian: jac.bj,
    captureRadiusKm: capture,
    ...opts,
  });
  return { ...dp, approach: a, captureRadiusKm: capture, bJacobian: jac.bj };
}
