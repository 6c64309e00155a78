/**
 * Cholesky factorisation A = L L^T (Golub & Van Loan 2013, Matrix Computations 4th ed., Alg. 4.2.1), and the
 * scaled form recommended for ill-conditioned orbit covariances (METHODS.md 6.1): Gamma = D R D with
 * D = diag(sigma), R the correlation matrix; factor R = L_R L_R^T and return L = D L_R.
 */

/** Lower-triangular L with A = L L^T, or null if a pivot is not positive (A not numerically positive definite). */
export function cholesky(a: Float64Array, n: number): Float64Array | null {
  if (a.length !== n * n) throw new RangeError('cholesky: size mismatch');
  const l = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= l[j * n + k] * l[j * n + k];
    if (!(d > 0)) return null;
    const ljj = Math.sqrt(d);
    l[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= l[i * n + k] * l[j * n + k];
      l[i * n + j] = s / ljj;
    }
  }
  return l;
}

/** Gamma = D R D: sigma_i = sqrt(Gamma_ii), R_ij = Gamma_ij / (sigma_i sigma_j). Throws if a variance is not > 0. */
export function scaleCovariance(cov: Float64Array, n: number): { sigmas: Float64Array; correlation: Float64Array } {
  const sigmas = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = cov[i * n + i];
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`variance ${i} is not a positive finite number: ${v}`);
    sigmas[i] = Math.sqrt(v);
  }
  const correlation = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) correlation[i * n + j] = cov[i * n + j] / (sigmas[i] * sigmas[j]);
  return { sigmas, correlation };
}

/** L = D L_R with D = diag(sigmas), L_R lower triangular. */
export function unscaleFactor(lCorrelation: Float64Array, sigmas: Float64Array, n: number): Float64Array {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) l[i * n + j] = sigmas[i] * lCorrelation[i * n + j];
  return l;
}

/** Scaled Cholesky of a covariance: returns L (Gamma = L L^T) and the pieces, or null if R is not positive definite. */
export function scaledCholesky(
  cov: Float64Array,
  n: number,
): { l: Float64Array; sigmas: Float64Array; correlation: Float64Array; lCorrelation: Float64Array } | null {
  const { sigmas, correlation } = scaleCovariance(cov, n);
  const lCorrelation = cholesky(correlation, n);
  if (!lCorrelation) return null;
  return { l: unscaleFactor(lCorrelation, sigmas, n), sigmas, correlation, lCorrelation };
}
