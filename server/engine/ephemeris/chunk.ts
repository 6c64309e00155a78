/**
 * What the two analytic series, VSOP87 (vsop87.ts) and ELP/MPP02 (elpmpp02.ts), share: the packed layout (per
 * variable L/B/R, per power α of time: rows of numbers, one row a periodic term), the sum over powers
 * Σ_α t^α S_α(t) with its derivative, and the parts of the chunk samplers of the Chebyshev cache (chebyshev.ts).
 *
 * Chunk samplers: both flatten their series into segments, one per (variable L/B/R, power of time), sum every
 * segment's terms at the n node offsets of K consecutive granules into acc[s·K·n + g·n + k], and rotate each
 * term from the granule centre to a node through a per-term table of cos/sin(rate·dt_k). The term loop itself
 * differs (linear phases in VSOP87, quartic phases with a second-order correction in ELP/MPP02) and stays in each.
 */

/** The segments of a flattened series: terms segStart[s]..segStart[s+1]−1 are variable segVar[s] (0 L, 1 B, 2 R) times t^segPow[s]. */
export interface SeriesSegments {
  segStart: Int32Array;
  segVar: Int8Array;
  segPow: Int8Array;
}

/** One variable's terms per power α of time: rows of `stride` numbers each. */
export type PackedVariable = Float64Array[];

/**
 * Pack one variable of the astronomia data ({ "0": rows, "1": rows, … }, rows of up to `stride` numbers; missing
 * trailing numbers are 0) per power. `what` names the data in the error for a gap in the powers.
 */
export function packVariable(v: Record<string, number[][]>, stride: number, what: string): PackedVariable {
  const powers = Object.keys(v)
    .map(Number)
    .sort((a, b) => a - b);
  const out: PackedVariable = [];
  for (const p of powers) {
    if (p !== out.length) throw new Error(`${what} data: missing power ${out.length}`);
    const rows = v[String(p)];
    const arr = new Float64Array(rows.length * stride);
    rows.forEach((r, i) => {
      for (let j = 0; j < stride; j++) arr[stride * i + j] = r[j] ?? 0;
    });
    out.push(arr);
  }
  return out;
}

const SD = new Float64Array(2);

/**
 * Σ_α t^α S_α and its t-derivative Σ_α (α t^(α−1) S_α + t^α dS_α/dt) into out[k], out[k + 1]; `sums(arr, sd)`
 * writes S_α and dS_α/dt of the terms `arr` of power α at t into sd[0], sd[1].
 */
export function powerSeriesInto(v: PackedVariable, t: number, out: Float64Array, k: number, sums: (arr: Float64Array, sd: Float64Array) => void): void {
  let value = 0;
  let deriv = 0;
  let tPow = 1; // t^α
  let tPowM1 = 0; // α·t^(α−1)
  for (let alpha = 0; alpha < v.length; alpha++) {
    sums(v[alpha], SD);
    const s = SD[0];
    const ds = SD[1];
    value += tPow * s;
    deriv += tPowM1 * s + tPow * ds;
    tPowM1 = (alpha + 1) * tPow;
    tPow *= t;
  }
  out[k] = value;
  out[k + 1] = deriv;
}

/** Σ_α t^α S_α without the derivative; `sum(arr)` is S_α of the terms `arr` of power α at t. */
export function powerSeriesValue(v: PackedVariable, t: number, sum: (arr: Float64Array) => number): number {
  let value = 0;
  let tPow = 1;
  for (let alpha = 0; alpha < v.length; alpha++) {
    value += tPow * sum(v[alpha]);
    tPow *= t;
  }
  return value;
}

/**
 * Per term i: cos and sin of rate(i)·offsetsDays[k]/daysPerUnit for the n offsets, as 2n values from 2n·i on (the n
 * cosines, then the n sines).
 */
export function nodeRotationTable(nTerms: number, rate: (i: number) => number, offsetsDays: Float64Array, daysPerUnit: number): Float64Array {
  const n = offsetsDays.length;
  const node = new Float64Array(nTerms * 2 * n);
  for (let i = 0; i < nTerms; i++) {
    const c = rate(i);
    for (let k = 0; k < n; k++) {
      const x = (c * offsetsDays[k]) / daysPerUnit;
      node[2 * n * i + k] = Math.cos(x);
      node[2 * n * i + n + k] = Math.sin(x);
    }
  }
  return node;
}

/**
 * Combine the segment sums of a chunk into the series' three variables at every node: with t the time of node k of
 * granule g in the series' unit, L, B and R are the sums over segments of acc[s·K·n + g·n + k]·t^segPow[s] for
 * each variable; `emit(t, L, B, R, o)` writes the position at o = 3(g·n + k).
 */
export function combineSegments(
  seg: SeriesSegments,
  acc: Float64Array,
  centre0Days: number,
  stepDays: number,
  K: number,
  offsetsDays: Float64Array,
  daysPerUnit: number,
  emit: (t: number, L: number, B: number, R: number, o: number) => void,
): void {
  const n = offsetsDays.length;
  const nSeg = seg.segVar.length;
  const Kn = K * n;
  for (let g = 0; g < K; g++) {
    for (let k = 0; k < n; k++) {
      const t = (centre0Days + g * stepDays + offsetsDays[k]) / daysPerUnit;
      let L = 0;
      let B = 0;
      let R = 0;
      for (let s = 0; s < nSeg; s++) {
        const v = acc[s * Kn + g * n + k] * Math.pow(t, seg.segPow[s]);
        const w = seg.segVar[s];
        if (w === 0) L += v;
        else if (w === 1) B += v;
        else R += v;
      }
      emit(t, L, B, R, 3 * (g * n + k));
    }
  }
}

/** Series as packed per variable [L, B, R], per power of time: rows of `stride` numbers, one row a term. */
type PackedSeries = readonly (readonly Float64Array[])[];

/** The number of terms of a packed series. */
export function seriesTermCount(variables: PackedSeries, stride: number): number {
  let total = 0;
  for (const powers of variables) for (const arr of powers) total += arr.length / stride;
  return total;
}

/**
 * Flatten a packed series into one run of terms with its segments (variable-major, then power); `put(i, arr, j)`
 * stores the term whose row starts at arr[j] as term i (0 ≤ i < seriesTermCount).
 */
export function flattenSeries(variables: PackedSeries, stride: number, put: (i: number, arr: Float64Array, j: number) => void): SeriesSegments {
  const nSeg = variables.reduce((s, powers) => s + powers.length, 0);
  const seg: SeriesSegments = { segStart: new Int32Array(nSeg + 1), segVar: new Int8Array(nSeg), segPow: new Int8Array(nSeg) };
  let i = 0;
  let s = 0;
  variables.forEach((powers, v) =>
    powers.forEach((arr, a) => {
      seg.segStart[s] = i;
      seg.segVar[s] = v;
      seg.segPow[s] = a;
      s++;
      for (let j = 0; j < arr.length; j += stride, i++) put(i, arr, j);
    }),
  );
  seg.segStart[nSeg] = i;
  return seg;
}
