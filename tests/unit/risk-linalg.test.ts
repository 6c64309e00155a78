import { describe, expect, it } from 'vitest';
import {
  CovarianceError,
  cholesky,
  fromEigen,
  identity,
  jacobiEigenSymmetric,
  matMul,
  scaledCholesky,
  symmetrise,
  transpose,
  validateCovariance,
} from '../../server/engine/linalg';
import { RandomStream } from '../../server/engine/risk/random';
import { drawGaussian } from '../../server/engine/risk/sampling';

const NAMES6 = ['x', 'y', 'z', 'vx', 'vy', 'vz'];

/** A realistic, badly scaled 6x6 state covariance: sigmas 1e-8 AU ... 1e-11 AU/d, strong correlations. */
function orbitLikeCovariance(): Float64Array {
  const sig = [3e-8, 8e-8, 2e-8, 4e-10, 9e-11, 3e-11];
  const r = [
    [1, 0.9, 0.2, -0.5, 0.1, 0.0],
    [0.9, 1, 0.3, -0.4, 0.2, 0.1],
    [0.2, 0.3, 1, 0.0, 0.1, -0.2],
    [-0.5, -0.4, 0.0, 1, 0.3, 0.1],
    [0.1, 0.2, 0.1, 0.3, 1, 0.4],
    [0.0, 0.1, -0.2, 0.1, 0.4, 1],
  ];
  const c = new Float64Array(36);
  for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) c[i * 6 + j] = r[i][j] * sig[i] * sig[j];
  return c;
}

describe('dense helpers', () => {
  it('multiply, transpose and symmetrise', () => {
    const a = Float64Array.from([1, 2, 3, 4, 5, 6]); // 2x3
    const b = Float64Array.from([7, 8, 9, 10, 11, 12]); // 3x2
    expect(Array.from(matMul(a, b, 2, 3, 2))).toEqual([58, 64, 139, 154]); // hand computed
    expect(Array.from(transpose(a, 2, 3))).toEqual([1, 4, 2, 5, 3, 6]);
    expect(Array.from(symmetrise(Float64Array.from([1, 2, 4, 3]), 2))).toEqual([1, 3, 3, 3]);
  });
});

describe('Jacobi eigen-decomposition', () => {
  it('reproduces the analytic spectrum of the second-difference matrix (lambda_k = 2 - 2 cos(k pi/(n+1)))', () => {
    // Standard result for tridiag(-1, 2, -1), e.g. Golub & Van Loan 2013 §4.8.
    const n = 9;
    const a = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      a[i * n + i] = 2;
      if (i > 0) a[i * n + i - 1] = a[(i - 1) * n + i] = -1;
    }
    const { values, vectors } = jacobiEigenSymmetric(a, n);
    for (let k = 1; k <= n; k++) expect(values[k - 1]).toBeCloseTo(2 - 2 * Math.cos((k * Math.PI) / (n + 1)), 13);
    // V^T V = I and V diag V^T = A
    const vtv = matMul(transpose(vectors, n, n), vectors, n, n, n);
    const I = identity(n);
    for (let i = 0; i < n * n; i++) expect(vtv[i]).toBeCloseTo(I[i], 13);
    const back = fromEigen(values, vectors, n);
    for (let i = 0; i < n * n; i++) expect(back[i]).toBeCloseTo(a[i], 13);
  });
});

describe('Cholesky', () => {
  it('L L^T reproduces an ill-conditioned covariance through the scaled form', () => {
    const c = orbitLikeCovariance();
    const f = scaledCholesky(c, 6)!;
    expect(f).not.toBeNull();
    const llt = matMul(f.l, transpose(f.l, 6, 6), 6, 6, 6);
    for (let i = 0; i < 36; i++) expect(Math.abs(llt[i] - c[i])).toBeLessThan(1e-14 * Math.sqrt(c[(Math.floor(i / 6)) * 7] * c[(i % 6) * 7]));
    for (let i = 0; i < 6; i++) for (let j = i + 1; j < 6; j++) expect(f.l[i * 6 + j]).toBe(0);
  });

  it('returns null for a matrix that is not positive definite', () => {
    expect(cholesky(Float64Array.from([1, 2, 2, 1]), 2)).toBeNull();
  });
});

describe('covariance validation (METHODS.md 6.1; issue 4 item 1)', () => {
  it('accepts a valid 6x6 and reports the condition number of the correlation matrix', () => {
    const v = validateCovariance(orbitLikeCovariance(), { names: NAMES6 });
    expect(v.repair).toBeNull();
    expect(v.correlationConditionNumber).toBeGreaterThan(1);
    expect(v.names).toEqual(NAMES6);
  });

  it('refuses a non-positive-definite matrix, naming the eigenvalue and its direction', () => {
    // Correlation 1.2 between x and vx: R has eigenvalue 1 - 1.2 = -0.2 along (x - vx)/sqrt(2).
    const c = orbitLikeCovariance();
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) if (i !== j) c[i * 6 + j] = 0;
    const s0 = Math.sqrt(c[0]);
    const s3 = Math.sqrt(c[21]);
    c[3] = c[18] = 1.2 * s0 * s3;
    let err: unknown;
    try {
      validateCovariance(c, { names: NAMES6 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(CovarianceError);
    const ce = err as CovarianceError;
    expect(ce.code).toBe('not-positive-definite');
    expect(ce.eigenvalue).toBeCloseTo(-0.2, 12);
    expect(ce.message).toContain('-2.000e-1');
    expect(ce.direction.map((d) => d.name).sort()).toEqual(['vx', 'x']);
    expect(Math.abs(ce.direction[0].component)).toBeCloseTo(Math.SQRT1_2, 12);
    expect(ce.direction[0].component * ce.direction[1].component).toBeLessThan(0); // x and vx opposite
    expect(ce.message).toMatch(/0\.707 (x|vx) -0\.707 (x|vx)/);
    // Asking for repair does not help: |lambda_min|/lambda_max = 0.2/2.2 >> 1e-6.
    expect(() => validateCovariance(c, { names: NAMES6, repair: true })).toThrow(/refused/);
    try {
      validateCovariance(c, { names: NAMES6, repair: true });
    } catch (e) {
      expect((e as CovarianceError).code).toBe('negative-eigenvalue-too-large');
    }
  });

  it('repairs a slightly indefinite matrix only when asked, and reports what changed', () => {
    // R = V diag(lambda) V^T with one eigenvalue -1e-9 (ratio ~ -4e-10, below the refusal threshold).
    const n = 6;
    const q = jacobiEigenSymmetric(validateCovariance(orbitLikeCovariance()).correlation, n).vectors;
    const lambdas = Float64Array.from([-1e-9, 0.2, 0.5, 1, 1.8, 2.5]);
    const r = fromEigen(lambdas, q, n);
    const sig = [1e-8, 2e-8, 3e-8, 1e-10, 2e-10, 3e-10];
    const c = new Float64Array(36);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) c[i * n + j] = r[i * n + j] * sig[i] * sig[j];
    expect(() => validateCovariance(c, { names: NAMES6 })).toThrow(CovarianceError);
    const v = validateCovariance(c, { names: NAMES6, repair: true, clipEpsilon: 1e-12 });
    expect(v.repair).not.toBeNull();
    expect(v.repair!.clippedCount).toBe(1);
    // lambda_max of the scaled matrix: R's diagonal is not exactly 1 here, so compare with the eigenvalues of R.
    const eigR = jacobiEigenSymmetric(validateCovariance(c, { repair: true }).correlation, n);
    expect(eigR.values[0]).toBeGreaterThan(0);
    expect(v.repair!.mostNegativeRatio).toBeLessThan(0);
    expect(v.repair!.mostNegativeRatio).toBeGreaterThan(-1e-6);
    // ||dGamma||_F/||Gamma||_F is of the order of the clipped amount relative to the spectrum: tiny but > 0.
    expect(v.repair!.relativeFrobeniusChange).toBeGreaterThan(0);
    expect(v.repair!.relativeFrobeniusChange).toBeLessThan(1e-8);
    // The repaired factor reproduces the repaired covariance.
    const llt = matMul(v.cholesky, transpose(v.cholesky, n, n), n, n, n);
    for (let i = 0; i < 36; i++) expect(Math.abs(llt[i] - v.covariance[i])).toBeLessThan(1e-12 * sig[Math.floor(i / 6)] * sig[i % 6]);
  });

  it('refuses asymmetric matrices, zero variances, wrong shapes and non-finite entries', () => {
    const c = orbitLikeCovariance();
    c[1] *= 1.001;
    expect(() => validateCovariance(c, { names: NAMES6 })).toThrow(/not symmetric.*\(x, y\)/);
    const d = orbitLikeCovariance();
    d[35] = 0;
    expect(() => validateCovariance(d, { names: NAMES6 })).toThrow(/variance of vz is 0/);
    expect(() => validateCovariance([[1]])).toThrow(/between 2x2 and 9x9/);
    expect(() => validateCovariance([[1, NaN], [NaN, 1]])).toThrow(/not finite/);
    // Tiny asymmetry (round-off) is symmetrised, not refused.
    const e = orbitLikeCovariance();
    e[1] *= 1 + 1e-12;
    expect(validateCovariance(e).maxRelativeAsymmetry).toBeGreaterThan(0);
  });

  it('accepts 9x9 with non-gravitational parameters', () => {
    const n = 9;
    const c = new Float64Array(81);
    const base = orbitLikeCovariance();
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) c[i * n + j] = base[i * 6 + j];
    c[6 * n + 6] = 1e-26;
    c[7 * n + 7] = 1e-28;
    c[8 * n + 8] = 1e-30;
    c[6 * n + 0] = c[0 * n + 6] = 0.3 * Math.sqrt(1e-26 * base[0]);
    const v = validateCovariance(c, { names: [...NAMES6, 'A1', 'A2', 'A3'] });
    expect(v.n).toBe(9);
  });
});

describe('Gaussian draws through the Cholesky factor', () => {
  it('sample mean and covariance converge to the input (5-sigma entrywise tolerances) and a wrong factor fails', () => {
    const cov = orbitLikeCovariance();
    const v = validateCovariance(cov, { names: NAMES6 });
    const mean = [1, -0.5, 0.2, 0.01, 0.002, -0.003];
    const N = 100_000;
    function sampleStats(l: Float64Array) {
      const sum = new Float64Array(6);
      const sxy = new Float64Array(36);
      const x = new Float64Array(6);
      const z = new Float64Array(6);
      for (let k = 0; k < N; k++) {
        drawGaussian(mean, l, 6, RandomStream.forClone(2024, k), x, z);
        for (let i = 0; i < 6; i++) {
          const di = x[i] - mean[i];
          sum[i] += di;
          for (let j = 0; j < 6; j++) sxy[i * 6 + j] += di * (x[j] - mean[j]);
        }
      }
      return { meanDev: sum.map((s) => s / N), cov: sxy.map((s) => s / N) };
    }
    function worstZ(stats: ReturnType<typeof sampleStats>): number {
      let worst = 0;
      for (let i = 0; i < 6; i++) {
        worst = Math.max(worst, Math.abs(stats.meanDev[i]) / Math.sqrt(cov[i * 7] / N));
        for (let j = 0; j < 6; j++) {
          // Var of a sample covariance (known mean) = (S_ii S_jj + S_ij^2)/N.
          const se = Math.sqrt((cov[i * 7] * cov[j * 7] + cov[i * 6 + j] ** 2) / N);
          worst = Math.max(worst, Math.abs(stats.cov[i * 6 + j] - cov[i * 6 + j]) / se);
        }
      }
      return worst;
    }
    expect(worstZ(sampleStats(v.cholesky))).toBeLessThan(5);
    // Control: dropping the correlations (diagonal factor) must fail the same tolerance.
    const diag = new Float64Array(36);
    for (let i = 0; i < 6; i++) diag[i * 7] = v.sigmas[i];
    expect(worstZ(sampleStats(diag))).toBeGreaterThan(5);
  });
});
