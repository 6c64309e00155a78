/**
 * Small dense matrices on Float64Array, row-major: element (i, j) of an r x c matrix is a[i * c + j].
 * Sizes are passed explicitly (these are 2x2 ... 9x9 matrices; no allocation-heavy abstractions).
 */

/** Build a row-major Float64Array from nested rows; throws if the rows are ragged. */
export function fromRows(rows: readonly (readonly number[])[]): { data: Float64Array; rows: number; cols: number } {
  const r = rows.length;
  const c = r === 0 ? 0 : rows[0].length;
  const data = new Float64Array(r * c);
  for (let i = 0; i < r; i++) {
    if (rows[i].length !== c) throw new RangeError(`row ${i} has ${rows[i].length} entries, expected ${c}`);
    for (let j = 0; j < c; j++) data[i * c + j] = rows[i][j];
  }
  return { data, rows: r, cols: c };
}

/** Nested rows from a row-major array. */
export function toRows(a: Float64Array, rows: number, cols: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < rows; i++) out.push(Array.from(a.subarray(i * cols, (i + 1) * cols)));
  return out;
}

/** n x n identity. */
export function identity(n: number): Float64Array {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) a[i * n + i] = 1;
  return a;
}

/** C = A B with A r x m and B m x c. */
export function matMul(a: Float64Array, b: Float64Array, r: number, m: number, c: number, out = new Float64Array(r * c)): Float64Array {
  if (a.length !== r * m || b.length !== m * c) throw new RangeError('matMul: size mismatch');
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      let s = 0;
      for (let k = 0; k < m; k++) s += a[i * m + k] * b[k * c + j];
      out[i * c + j] = s;
    }
  }
  return out;
}

/** y = A x with A r x c. */
export function matVec(a: Float64Array, x: ArrayLike<number>, r: number, c: number, out = new Float64Array(r)): Float64Array {
  for (let i = 0; i < r; i++) {
    let s = 0;
    for (let k = 0; k < c; k++) s += a[i * c + k] * x[k];
    out[i] = s;
  }
  return out;
}

/** Transpose of an r x c matrix (result c x r). */
export function transpose(a: Float64Array, r: number, c: number): Float64Array {
  const t = new Float64Array(r * c);
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) t[j * r + i] = a[i * c + j];
  return t;
}

/** (A + A^T) / 2 for a square n x n matrix. */
export function symmetrise(a: Float64Array, n: number): Float64Array {
  const s = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    s[i * n + i] = a[i * n + i];
    for (let j = i + 1; j < n; j++) {
      const v = 0.5 * (a[i * n + j] + a[j * n + i]);
      s[i * n + j] = v;
      s[j * n + i] = v;
    }
  }
  return s;
}

/** A B A^T for A r x n and symmetric B n x n (covariance mapping); result r x r, symmetrised. */
export function congruence(a: Float64Array, b: Float64Array, r: number, n: number): Float64Array {
  const ab = matMul(a, b, r, n, n);
  return symmetrise(matMul(ab, transpose(a, r, n), r, n, r), r);
}

/** Frobenius norm. */
export function frobeniusNorm(a: Float64Array): number {
  let scale = 0;
  for (let i = 0; i < a.length; i++) scale = Math.max(scale, Math.abs(a[i]));
  if (scale === 0) return 0;
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    const v = a[i] / scale;
    s += v * v;
  }
  return scale * Math.sqrt(s);
}
