/**
 * Weighted least squares for orbit determination (METHODS.md §9.1; Milani & Gronchi 2010 ch. 5 [M]).
 *
 * Each observation i gives a residual pair xi_i = (Δα cos δ, Δδ) (observed minus computed, radians), the partials
 * P_i = ∂(computed)/∂p (2 x n) and the inverse of its 2x2 observation covariance W_i (a full block when an RA/Dec
 * correlation is given). With B_i = ∂xi_i/∂p = -P_i:
 *
 *   normal matrix C = Σ P_iᵀ W_i P_i,  right-hand side  d = Σ P_iᵀ W_i xi_i,  step Δp = C⁻¹ d,
 *   chi² = Σ xi_iᵀ W_i xi_i,  normalised RMS = √(chi² / m) with m the number of scalar residuals,
 *   convergence measure Δpᵀ C Δp / n (METHODS §9.1: iterate until ≪ 1),
 *   covariance Γ = C⁻¹.
 *
 * C mixes AU, AU/d and AU/d² columns (condition numbers ~1e20), so it is solved with Cholesky on the SCALED matrix
 * S C S, S = diag(1/√C_jj) (METHODS §9.1 "Cholesky on a scaled C"); Γ = S (S C S)⁻¹ S.
 *
 * The iteration (differentialCorrection) is Gauss–Newton with step halving: when a full step makes chi² grow, the
 * step is halved (up to MAX_HALVINGS times). A step that still does not reduce chi² ends the fit as not converged
 * (reported, not thrown). Convergence: Δpᵀ C Δp / n < CONVERGENCE_MEASURE (1e-4, i.e. a step of 1 % of the
 * formal sigma; common practice, no source).
 */
import { cholesky } from '../linalg/cholesky';

export const ARCSEC_RAD = Math.PI / (180 * 3600);
export const CONVERGENCE_MEASURE = 1e-4;
export const MAX_HALVINGS = 8;

/** Observation covariance (rad²) and its inverse for sigmas in arcsec and a correlation. */
export function observationWeight(sigmaRaArcsec: number, sigmaDecArcsec: number, corr: number): {
  covariance: [number, number, number];
  weight: [number, number, number];
} {
  const sa = sigmaRaArcsec * ARCSEC_RAD;
  const sd = sigmaDecArcsec * ARCSEC_RAD;
  if (!(sa > 0 && sd > 0)) throw new RangeError(`observation sigmas must be > 0 (got ${sigmaRaArcsec}", ${sigmaDecArcsec}")`);
  if (!(Math.abs(corr) < 1)) throw new RangeError(`RA/Dec correlation must be in (-1, 1), got ${corr}`);
  const caa = sa * sa;
  const cad = corr * sa * sd;
  const cdd = sd * sd;
  const det = caa * cdd - cad * cad;
  return { covariance: [caa, cad, cdd], weight: [cdd / det, -cad / det, caa / det] };
}

/** xiᵀ W xi for a 2-vector and a symmetric 2x2 packed as [w00, w01, w11]. */
export function quadratic2(x0: number, x1: number, w: ArrayLike<number>, offset = 0): number {
  return w[offset] * x0 * x0 + 2 * w[offset + 1] * x0 * x1 + w[offset + 2] * x1 * x1;
}

export interface NormalEquations {
  n: number;
  /** C, n x n row-major */
  normal: Float64Array;
  /** Σ Pᵀ W xi */
  rhs: Float64Array;
  chiSquare: number;
  /** number of observations (pairs) used */
  used: number;
}

/**
 * Accumulate the normal equations over the used observations. residuals: 2N (radians), partials: 2N x n row-major
 * (∂computed/∂p), weights: 3N packed inverse covariances.
 */
export function normalEquations(
  residuals: Float64Array,
  partials: Float64Array,
  weights: Float64Array,
  used: ArrayLike<boolean | number>,
  n: number,
): NormalEquations {
  const N = residuals.length / 2;
  const normal = new Float64Array(n * n);
  const rhs = new Float64Array(n);
  let chi2 = 0;
  let count = 0;
  const wp0 = new Float64Array(n);
  const wp1 = new Float64Array(n);
  for (let i = 0; i < N; i++) {
    if (!used[i]) continue;
    count++;
    const w00 = weights[3 * i], w01 = weights[3 * i + 1], w11 = weights[3 * i + 2];
    const r0 = residuals[2 * i], r1 = residuals[2 * i + 1];
    chi2 += w00 * r0 * r0 + 2 * w01 * r0 * r1 + w11 * r1 * r1;
    const o0 = 2 * i * n;
    const o1 = o0 + n;
    // rows of W P: (W P)_0j = w00 P0j + w01 P1j, (W P)_1j = w01 P0j + w11 P1j
    for (let j = 0; j < n; j++) {
      wp0[j] = w00 * partials[o0 + j] + w01 * partials[o1 + j];
      wp1[j] = w01 * partials[o0 + j] + w11 * partials[o1 + j];
    }
    for (let j = 0; j < n; j++) {
      rhs[j] += wp0[j] * r0 + wp1[j] * r1;
      for (let k = j; k < n; k++) normal[j * n + k] += partials[o0 + j] * wp0[k] + partials[o1 + j] * wp1[k];
    }
  }
  for (let j = 0; j < n; j++) for (let k = 0; k < j; k++) normal[j * n + k] = normal[k * n + j];
  return { n, normal, rhs, chiSquare: chi2, used: count };
}

/** Solve C x = b and (optionally) invert C by Cholesky of the scaled matrix. Null when C is not positive definite. */
export function solveNormal(normal: Float64Array, rhs: Float64Array, n: number, wantCovariance: boolean): {
  step: Float64Array;
  covariance: Float64Array | null;
} | null {
  const s = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const d = normal[j * n + j];
    if (!(d > 0) || !Number.isFinite(d)) return null;
    s[j] = 1 / Math.sqrt(d);
  }
  const scaled = new Float64Array(n * n);
  for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) scaled[j * n + k] = s[j] * normal[j * n + k] * s[k];
  const l = cholesky(scaled, n);
  if (!l) return null;
  const solve = (b: Float64Array): Float64Array => {
    // L y = b, Lᵀ x = y
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let v = b[i];
      for (let k = 0; k < i; k++) v -= l[i * n + k] * y[k];
      y[i] = v / l[i * n + i];
    }
    const x = new Float64Array(n);
    for (let i = n - 1; i >= 0; i--) {
      let v = y[i];
      for (let k = i + 1; k < n; k++) v -= l[k * n + i] * x[k];
      x[i] = v / l[i * n + i];
    }
    return x;
  };
  const bs = new Float64Array(n);
  for (let j = 0; j < n; j++) bs[j] = s[j] * rhs[j];
  const ys = solve(bs);
  const step = new Float64Array(n);
  for (let j = 0; j < n; j++) step[j] = s[j] * ys[j];
  let covariance: Float64Array | null = null;
  if (wantCovariance) {
    covariance = new Float64Array(n * n);
    const e = new Float64Array(n);
    for (let c = 0; c < n; c++) {
      e.fill(0);
      e[c] = 1;
      const col = solve(e);
      for (let r = 0; r < n; r++) covariance[r * n + c] = s[r] * col[r] * s[c];
    }
    for (let r = 0; r < n; r++) {
      for (let c = 0; c < r; c++) {
        const v = 0.5 * (covariance[r * n + c] + covariance[c * n + r]);
        covariance[r * n + c] = v;
        covariance[c * n + r] = v;
      }
    }
  }
  return { step, covariance };
}

/** Δpᵀ C Δp / n. */
export function correctionMeasure(step: Float64Array, normal: Float64Array, n: number): number {
  let s = 0;
  for (let j = 0; j < n; j++) {
    let v = 0;
    for (let k = 0; k < n; k++) v += normal[j * n + k] * step[k];
    s += step[j] * v;
  }
  return s / n;
}

/** One evaluation of the model: residuals xi (2N, radians) and optionally partials ∂computed/∂p (2N x n). */
export interface ModelEvaluation {
  residuals: Float64Array;
  partials: Float64Array | null;
}

export interface LeastSquaresProblem {
  /** number of parameters */
  n: number;
  /** number of observations (residual pairs) */
  count: number;
  /** packed inverse covariances, 3 per observation */
  weights: Float64Array;
  /** Throws for a parameter vector the model cannot evaluate (the step is then halved). */
  evaluate(params: Float64Array, withPartials: boolean): ModelEvaluation;
}

export interface IterationRecord {
  iteration: number;
  rmsNormalized: number;
  correctionMeasure: number;
}

export interface LeastSquaresResult {
  status: 'converged' | 'not-converged' | 'failed';
  message: string | null;
  params: Float64Array;
  /** evaluation (with partials) at params; null only when the very first evaluation failed */
  evaluation: ModelEvaluation | null;
  normal: Float64Array | null;
  covariance: Float64Array | null;
  chiSquare: number;
  used: number;
  iterations: IterationRecord[];
}

export interface LeastSquaresOptions {
  maxIterations: number;
  convergence?: number;
  /** called after every iteration */
  onIteration?: (record: IterationRecord) => void;
  /** checked before every model evaluation */
  checkAbort?: () => void;
}

function chiSquareOf(ev: ModelEvaluation, weights: Float64Array, used: ArrayLike<boolean | number>): number {
  let c = 0;
  const N = ev.residuals.length / 2;
  for (let i = 0; i < N; i++) if (used[i]) c += quadratic2(ev.residuals[2 * i], ev.residuals[2 * i + 1], weights, 3 * i);
  return c;
}

function tryEvaluate(problem: LeastSquaresProblem, p: Float64Array, partials: boolean, checkAbort?: () => void): ModelEvaluation | null {
  checkAbort?.();
  try {
    const ev = problem.evaluate(p, partials);
    if (!ev.residuals.every(Number.isFinite)) return null;
    if (partials && ev.partials && !ev.partials.every(Number.isFinite)) return null;
    return ev;
  } catch (err) {
    if ((err as Error)?.name === 'AbortError') throw err;
    return null;
  }
}

/**
 * Gauss–Newton differential correction with step halving. `used[i]` selects the observations that enter the fit.
 */
export function differentialCorrection(
  problem: LeastSquaresProblem,
  start: Float64Array,
  used: ArrayLike<boolean | number>,
  options: LeastSquaresOptions,
): LeastSquaresResult {
  const n = problem.n;
  const tol = options.convergence ?? CONVERGENCE_MEASURE;
  const iterations: IterationRecord[] = [];
  let p: Float64Array = Float64Array.from(start);
  let m = 0;
  for (let i = 0; i < problem.count; i++) if (used[i]) m++;
  if (2 * m < n) {
    return { status: 'failed', message: `${m} observations cannot determine ${n} parameters`, params: p, evaluation: null, normal: null, covariance: null, chiSquare: NaN, used: m, iterations };
  }
  let ev = tryEvaluate(problem, p, true, options.checkAbort);
  if (!ev) {
    return { status: 'failed', message: 'the starting orbit could not be propagated over the arc', params: p, evaluation: null, normal: null, covariance: null, chiSquare: NaN, used: m, iterations };
  }
  let chi2 = chiSquareOf(ev, problem.weights, used);
  let status: LeastSquaresResult['status'] = 'not-converged';
  let message: string | null = `no convergence in ${options.maxIterations} iterations`;
  for (let it = 1; it <= options.maxIterations; it++) {
    const ne = normalEquations(ev.residuals, ev.partials!, problem.weights, used, n);
    const sol = solveNormal(ne.normal, ne.rhs, n, false);
    if (!sol) {
      status = 'failed';
      message = 'the normal matrix is singular (the observations do not determine all parameters)';
      break;
    }
    const measure = correctionMeasure(sol.step, ne.normal, n);
    let factor = 1;
    let accepted: { p: Float64Array; ev: ModelEvaluation; chi2: number } | null = null;
    for (let h = 0; h <= MAX_HALVINGS; h++) {
      const trial = new Float64Array(n);
      for (let j = 0; j < n; j++) trial[j] = p[j] + factor * sol.step[j];
      const tev = tryEvaluate(problem, trial, true, options.checkAbort);
      if (tev) {
        const c = chiSquareOf(tev, problem.weights, used);
        // accept a decrease, or a change at the level of rounding (converged fits move chi² by ~1e-12 relative)
        if (c <= chi2 * (1 + 1e-9) + 1e-9) {
          accepted = { p: trial, ev: tev, chi2: c };
          break;
        }
      }
      factor /= 2;
    }
    if (!accepted) {
      if (measure < tol) {
        status = 'converged';
        message = null;
      } else {
        status = 'not-converged';
        message = `diverging: chi-square grows along the correction even after ${MAX_HALVINGS} step halvings (iteration ${it})`;
      }
      iterations.push({ iteration: it, rmsNormalized: Math.sqrt(chi2 / (2 * m)), correctionMeasure: measure });
      options.onIteration?.(iterations[iterations.length - 1]);
      break;
    }
    p = accepted.p;
    ev = accepted.ev;
    chi2 = accepted.chi2;
    const rec = { iteration: it, rmsNormalized: Math.sqrt(chi2 / (2 * m)), correctionMeasure: measure };
    iterations.push(rec);
    options.onIteration?.(rec);
    if (measure < tol && factor === 1) {
      status = 'converged';
      message = null;
      break;
    }
  }
  const ne = normalEquations(ev.residuals, ev.partials!, problem.weights, used, n);
  const sol = solveNormal(ne.normal, ne.rhs, n, true);
  if (!sol && status !== 'failed') {
    status = 'failed';
    message = 'the normal matrix is singular at the solution (no covariance)';
  }
  return {
    status,
    message,
    params: p,
    evaluation: ev,
    normal: ne.normal,
    covariance: sol?.covariance ?? null,
    chiSquare: chi2,
    used: m,
    iterations,
  };
}
