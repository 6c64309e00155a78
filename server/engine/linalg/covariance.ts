/**
 * Covariance validation and (optional) repair, METHODS.md 6.1 and issue 4 item 1.
 *
 * Checks are made on the scaled matrix Gamma = D R D (D = diag(sigma), R the correlation matrix) so that the
 * mix of units (AU, AU/d, degrees, AU/d^2 for A1-A3) and condition numbers of 1e10 and more do not decide the
 * outcome:
 *  1. square n x n with n in 2..9 (6 state/element parameters, up to 3 non-gravitational ones), finite entries;
 *  2. every variance > 0 (a zero variance means a fixed parameter: remove it instead);
 *  3. symmetry: |Gamma_ij - Gamma_ji| <= symmetryTolerance * sigma_i sigma_j, then Gamma <- (Gamma + Gamma^T)/2;
 *  4. positive definiteness: Cholesky of R; if it fails, Jacobi eigen-decomposition of R names the most negative
 *     eigenvalue and its direction (the eigenvector's dominant parameters by name).
 * Repair (only when asked) clips the eigenvalues of R: lambda_i <- max(lambda_i, epsilon lambda_max) (the nearest
 * positive-semidefinite matrix in the Frobenius norm, Higham 1988, Linear Algebra Appl. 103, 103), and reports how
 * many were clipped, the most negative lambda/lambda_max and ||dGamma||_F/||Gamma||_F. Negative eigenvalues with
 * |lambda_min|/lambda_max > refuseRatio (default 1e-6) are a data error and are refused even when repair is asked.
 */
import { cholesky, scaleCovariance, unscaleFactor } from './cholesky';
import { fromEigen, jacobiEigenSymmetric } from './eigen';
import { frobeniusNorm } from './matrix';

export type CovarianceErrorCode =
  | 'shape'
  | 'non-finite'
  | 'non-positive-variance'
  | 'asymmetric'
  | 'not-positive-definite'
  | 'negative-eigenvalue-too-large';

export type DirectionComponent = { name: string; component: number };

/** A covariance matrix that cannot be used, with what is wrong and where. */
export class CovarianceError extends Error {
  readonly code: CovarianceErrorCode;
  /** Offending eigenvalue of the correlation matrix (not-positive-definite cases), else null. */
  readonly eigenvalue: number | null;
  /** eigenvalue / lambda_max of the correlation matrix, else null. */
  readonly ratio: number | null;
  /** Dominant components of the offending eigenvector (scaled coordinates), largest first. */
  readonly direction: DirectionComponent[];
  constructor(
    code: CovarianceErrorCode,
    message: string,
    details: { eigenvalue?: number; ratio?: number; direction?: DirectionComponent[] } = {},
  ) {
    super(message);
    this.name = 'CovarianceError';
    this.code = code;
    this.eigenvalue = details.eigenvalue ?? null;
    this.ratio = details.ratio ?? null;
    this.direction = details.direction ?? [];
  }
}

export type CovarianceRepair = {
  method: 'eigenvalue-clipping';
  /** Clipping floor epsilon (eigenvalues raised to epsilon * lambda_max of the correlation matrix). */
  epsilon: number;
  clippedCount: number;
  /** Most negative (smallest) eigenvalue of R divided by its largest. */
  mostNegativeRatio: number;
  /** ||Gamma_repaired - Gamma||_F / ||Gamma||_F. */
  relativeFrobeniusChange: number;
};

export type ValidatedCovariance = {
  n: number;
  names: string[];
  /** The symmetrised (and, if repaired, repaired) covariance, row-major n x n. */
  covariance: Float64Array;
  sigmas: Float64Array;
  correlation: Float64Array;
  /** Lower-triangular L with covariance = L L^T (= D L_R). */
  cholesky: Float64Array;
  /** Eigenvalues of the correlation matrix (ascending) and the condition number lambda_max/lambda_min of R. */
  correlationEigenvalues: Float64Array;
  correlationConditionNumber: number;
  /** Largest |Gamma_ij - Gamma_ji| / (sigma_i sigma_j) found before symmetrising. */
  maxRelativeAsymmetry: number;
  /** null when no repair was needed or asked; otherwise what the repair changed. */
  repair: CovarianceRepair | null;
};

export type CovarianceOptions = {
  /** Parameter names in order (e.g. ['x','y','z','vx','vy','vz','A1','A2']); defaults to p0..p(n-1). */
  names?: readonly string[];
  /** Clip eigenvalues when the matrix is not positive definite (default false: refuse). */
  repair?: boolean;
  /** Clipping floor relative to lambda_max (default 1e-12, METHODS.md 6.1 suggests 1e-14 ... 1e-12). */
  clipEpsilon?: number;
  /** Refuse repair when |lambda_min|/lambda_max exceeds this (default 1e-6, METHODS.md 6.1). */
  refuseRatio?: number;
  /** Largest accepted |Gamma_ij - Gamma_ji| / (sigma_i sigma_j) (default 1e-8). */
  symmetryTolerance?: number;
};

function dominantComponents(vectors: Float64Array, n: number, k: number, names: readonly string[]): DirectionComponent[] {
  const comps: DirectionComponent[] = [];
  for (let i = 0; i < n; i++) comps.push({ name: names[i], component: vectors[i * n + k] });
  // Fix the sign so the largest component is positive (an eigenvector's sign is arbitrary).
  comps.sort((a, b) => Math.abs(b.component) - Math.abs(a.component));
  if (comps[0].component < 0) for (const c of comps) c.component = -c.component;
  const picked = comps.filter((c, idx) => idx === 0 || Math.abs(c.component) >= 0.2).slice(0, 4);
  return picked;
}

function describeDirection(d: DirectionComponent[]): string {
  return d.map((c) => `${c.component >= 0 ? '+' : '-'}${Math.abs(c.component).toFixed(3)} ${c.name}`).join(' ');
}

/** Validate (and on request repair) a covariance matrix given as nested rows or a row-major array. */
export function validateCovariance(
  input: readonly (readonly number[])[] | Float64Array,
  options: CovarianceOptions = {},
): ValidatedCovariance {
  let n: number;
  let raw: Float64Array;
  if (input instanceof Float64Array) {
    n = Math.round(Math.sqrt(input.length));
    if (n * n !== input.length) throw new CovarianceError('shape', `covariance has ${input.length} entries, not a square number`);
    raw = Float64Array.from(input);
  } else {
    n = input.length;
    raw = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      if (input[i].length !== n) throw new CovarianceError('shape', `covariance row ${i} has ${input[i].length} entries, expected ${n}`);
      for (let j = 0; j < n; j++) raw[i * n + j] = input[i][j];
    }
  }
  if (n < 2 || n > 9) throw new CovarianceError('shape', `covariance must be between 2x2 and 9x9, got ${n}x${n}`);
  const names = options.names ? [...options.names] : Array.from({ length: n }, (_, i) => `p${i}`);
  if (names.length !== n) throw new CovarianceError('shape', `${names.length} parameter names for a ${n}x${n} covariance`);
  const clipEpsilon = options.clipEpsilon ?? 1e-12;
  const refuseRatio = options.refuseRatio ?? 1e-6;
  const symmetryTolerance = options.symmetryTolerance ?? 1e-8;

  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(raw[i])) {
      throw new CovarianceError('non-finite', `covariance entry (${names[Math.floor(i / n)]}, ${names[i % n]}) is not finite: ${raw[i]}`);
    }
  }
  for (let i = 0; i < n; i++) {
    if (!(raw[i * n + i] > 0)) {
      throw new CovarianceError(
        'non-positive-variance',
        `variance of ${names[i]} is ${raw[i * n + i]}; it must be > 0 (remove a parameter that was held fixed)`,
      );
    }
  }
  // Symmetry, relative to sigma_i sigma_j.
  let maxRelativeAsymmetry = 0;
  let worst = [0, 0];
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const rel = Math.abs(raw[i * n + j] - raw[j * n + i]) / Math.sqrt(raw[i * n + i] * raw[j * n + j]);
      if (rel > maxRelativeAsymmetry) {
        maxRelativeAsymmetry = rel;
        worst = [i, j];
      }
    }
  }
  if (maxRelativeAsymmetry > symmetryTolerance) {
    throw new CovarianceError(
      'asymmetric',
      `covariance is not symmetric: entries (${names[worst[0]]}, ${names[worst[1]]}) and (${names[worst[1]]}, ${names[worst[0]]}) ` +
        `differ by ${maxRelativeAsymmetry.toExponential(2)} sigma_i sigma_j (tolerance ${symmetryTolerance.toExponential(1)})`,
    );
  }
  const cov = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) cov[i * n + j] = 0.5 * (raw[i * n + j] + raw[j * n + i]);

  const { sigmas, correlation } = scaleCovariance(cov, n);
  const eig = jacobiEigenSymmetric(correlation, n);
  const lambdaMax = eig.values[n - 1];
  const lambdaMin = eig.values[0];
  const ratio = lambdaMin / lambdaMax;
  const lCorrelation = cholesky(correlation, n);

  if (lCorrelation && lambdaMin > 0) {
    return {
      n,
      names,
      covariance: cov,
      sigmas,
      correlation,
      cholesky: unscaleFactor(lCorrelation, sigmas, n),
      correlationEigenvalues: eig.values,
      correlationConditionNumber: lambdaMax / lambdaMin,
      maxRelativeAsymmetry,
      repair: null,
    };
  }

  const direction = dominantComponents(eig.vectors, n, 0, names);
  const where =
    `eigenvalue ${lambdaMin.toExponential(3)} of the correlation matrix (lambda/lambda_max = ${ratio.toExponential(3)}) ` +
    `along ${describeDirection(direction)}`;
  if (!options.repair) {
    throw new CovarianceError(
      'not-positive-definite',
      `covariance is not positive definite: ${where}. Fix the input, or ask for repair by eigenvalue clipping.`,
      { eigenvalue: lambdaMin, ratio, direction },
    );
  }
  if (-ratio > refuseRatio) {
    throw new CovarianceError(
      'negative-eigenvalue-too-large',
      `covariance refused, repair not attempted: ${where}; |lambda_min|/lambda_max exceeds ${refuseRatio.toExponential(1)}, ` +
        `which indicates a data error rather than round-off.`,
      { eigenvalue: lambdaMin, ratio, direction },
    );
  }
  const floor = clipEpsilon * lambdaMax;
  const clipped = Float64Array.from(eig.values);
  let clippedCount = 0;
  for (let k = 0; k < n; k++) {
    if (clipped[k] < floor) {
      clipped[k] = floor;
      clippedCount++;
    }
  }
  const repairedCorrelation = fromEigen(clipped, eig.vectors, n);
  const repairedCov = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) repairedCov[i * n + j] = repairedCorrelation[i * n + j] * sigmas[i] * sigmas[j];
  let lRepaired = cholesky(repairedCorrelation, n);
  if (!lRepaired) {
    // Round-off in the reconstruction can still defeat Cholesky at epsilon ~ 1e-14; add the floor to the diagonal once.
    for (let i = 0; i < n; i++) repairedCorrelation[i * n + i] += floor;
    for (let i = 0; i < n; i++) repairedCov[i * n + i] = repairedCorrelation[i * n + i] * sigmas[i] * sigmas[i];
    lRepaired = cholesky(repairedCorrelation, n);
    if (!lRepaired) throw new CovarianceError('not-positive-definite', `repair failed: ${where}`, { eigenvalue: lambdaMin, ratio, direction });
  }
  const diff = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) diff[i] = repairedCov[i] - cov[i];
  return {
    n,
    names,
    covariance: repairedCov,
    sigmas,
    correlation: repairedCorrelation,
    cholesky: unscaleFactor(lRepaired, sigmas, n),
    correlationEigenvalues: clipped,
    correlationConditionNumber: clipped[n - 1] / clipped[0],
    maxRelativeAsymmetry,
    repair: {
      method: 'eigenvalue-clipping',
      epsilon: clipEpsilon,
      clippedCount,
      mostNegativeRatio: ratio,
      relativeFrobeniusChange: frobeniusNorm(diff) / frobeniusNorm(cov),
    },
  };
}
