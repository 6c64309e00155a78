/**
 * Eigen-decomposition of a real symmetric matrix by the cyclic Jacobi method (Golub & Van Loan 2013, Matrix
 * Computations 4th ed., §8.5, Alg. 8.5.2 "sym.schur2" rotations with the row-by-row cyclic ordering).
 * Accurate to high relative precision for small matrices; cost O(n^3) per sweep, typically 6-10 sweeps.
 */

export type SymmetricEigen = {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Eigenvectors as columns, row-major n x n: component i of eigenvector k is vectors[i * n + k]. Orthonormal. */
  vectors: Float64Array;
  sweeps: number;
};

export function jacobiEigenSymmetric(a: Float64Array, n: number, maxSweeps = 60): SymmetricEigen {
  if (a.length !== n * n) throw new RangeError('jacobiEigenSymmetric: size mismatch');
  const m = Float64Array.from(a);
  // symmetrise defensively
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) m[i * n + j] = m[j * n + i] = 0.5 * (m[i * n + j] + m[j * n + i]);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  let sweeps = 0;
  for (; sweeps < maxSweeps; sweeps++) {
    let off = 0;
    let total = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const x = m[i * n + j] * m[i * n + j];
        total += x;
        if (i !== j) off += x;
      }
    }
    if (off <= 1e-32 * total || off === 0) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p * n + q];
        if (apq === 0) continue;
        const app = m[p * n + p];
        const aqq = m[q * n + q];
        // Golub & Van Loan sym.schur2: tau = (a_qq - a_pp)/(2 a_pq), t = sign(tau)/(|tau| + sqrt(1 + tau^2))
        const tau = (aqq - app) / (2 * apq);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.hypot(1, tau));
        const c = 1 / Math.hypot(1, t);
        const s = t * c;
        // M <- J^T M J with J the rotation in the (p, q) plane
        for (let k = 0; k < n; k++) {
          const mkp = m[k * n + p];
          const mkq = m[k * n + q];
          m[k * n + p] = c * mkp - s * mkq;
          m[k * n + q] = s * mkp + c * mkq;
        }
        for (let k = 0; k < n; k++) {
          const mpk = m[p * n + k];
          const mqk = m[q * n + k];
          m[p * n + k] = c * mpk - s * mqk;
          m[q * n + k] = s * mpk + c * mqk;
        }
        m[p * n + q] = 0;
        m[q * n + p] = 0;
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p];
          const vkq = v[k * n + q];
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  // sort ascending
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => m[x * n + x] - m[y * n + y]);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((src, k) => {
    values[k] = m[src * n + src];
    for (let i = 0; i < n; i++) vectors[i * n + k] = v[i * n + src];
  });
  return { values, vectors, sweeps };
}

/** Reconstruct V diag(values) V^T. */
export function fromEigen(values: Float64Array, vectors: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += vectors[i * n + k] * values[k] * vectors[j * n + k];
      out[i * n + j] = s;
      out[j * n + i] = s;
    }
  }
  return out;
}
