/**
 * Full VSOP87 version B (Bretagnon & Francou 1988, A&A 202, 309) as shipped by astronomia 4.2.0:
 * heliocentric spherical coordinates L, B, R referred to the dynamical ecliptic and equinox J2000 of VSOP87.
 * In VSOP87 versions A–E the "Earth" is the Earth itself, not the Earth–Moon barycentre (the EMB is a
 * separate body of version A and of the main version), so no EMB split is needed here.
 *
 * Evaluated with analytic time derivatives (each term A·cos(B + Cτ) differentiates to −A·C·sin(B + Cτ)),
 * so velocities come out of the series exactly, not by finite differences.
 */
import mercury from 'astronomia/data/vsop87Bmercury';
import venus from 'astronomia/data/vsop87Bvenus';
import earth from 'astronomia/data/vsop87Bearth';
import mars from 'astronomia/data/vsop87Bmars';
import jupiter from 'astronomia/data/vsop87Bjupiter';
import saturn from 'astronomia/data/vsop87Bsaturn';
import uranus from 'astronomia/data/vsop87Buranus';
import neptune from 'astronomia/data/vsop87Bneptune';
import { combineSegments, flattenSeries, nodeRotationTable, packVariable, powerSeriesInto, powerSeriesValue, seriesTermCount, type PackedVariable, type SeriesSegments } from './chunk';

export type Vsop87Planet = 'mercury' | 'venus' | 'earth' | 'mars' | 'jupiter' | 'saturn' | 'uranus' | 'neptune';

/** Days per Julian millennium: VSOP87's time unit. */
const DAYS_PER_MILLENNIUM = 365_250;

/** One coordinate (L, B or R): per power α of τ, flat triples [A, B, C] (chunk.ts PackedVariable). */
type PackedPlanet = { L: PackedVariable; B: PackedVariable; R: PackedVariable; termCount: number };

const RAW: Record<Vsop87Planet, AstronomiaVsop87Data> = { mercury, venus, earth, mars, jupiter, saturn, uranus, neptune };
const PACKED = new Map<Vsop87Planet, PackedPlanet>();

function packed(planet: Vsop87Planet): PackedPlanet {
  let p = PACKED.get(planet);
  if (!p) {
    const raw = RAW[planet];
    const L = packVariable(raw.L, 3, 'VSOP87');
    const B = packVariable(raw.B, 3, 'VSOP87');
    const R = packVariable(raw.R, 3, 'VSOP87');
    const termCount = [...L, ...B, ...R].reduce((s, a) => s + a.length / 3, 0);
    p = { L, B, R, termCount };
    PACKED.set(planet, p);
  }
  return p;
}

/** Number of periodic terms in the series of one planet (for provenance and benchmarks). */
export function vsop87TermCount(planet: Vsop87Planet): number {
  return packed(planet).termCount;
}

/** Evaluates Σ_α τ^α Σ A cos(B + Cτ) and its τ-derivative into out[k], out[k + 1]. */
function evalVariable(v: PackedVariable, tau: number, out: Float64Array, k: number): void {
  powerSeriesInto(v, tau, out, k, (arr, sd) => {
    let s = 0;
    let ds = 0;
    for (let i = 0; i < arr.length; i += 3) {
      const a = arr[i];
      const c = arr[i + 2];
      const phase = arr[i + 1] + c * tau;
      s += a * Math.cos(phase);
      ds -= a * c * Math.sin(phase);
    }
    sd[0] = s;
    sd[1] = ds;
  });
}

/** Σ_α τ^α Σ A cos(B + Cτ) without the derivative (cache building). */
function evalVariableValue(v: PackedVariable, tau: number): number {
  return powerSeriesValue(v, tau, (arr) => {
    let s = 0;
    for (let i = 0; i < arr.length; i += 3) s += arr[i] * Math.cos(arr[i + 1] + arr[i + 2] * tau);
    return s;
  });
}

/** Position only (AU, VSOP87 frame), half the cost of vsop87StateInto; out[3..5] are left untouched. */
export function vsop87PositionInto(planet: Vsop87Planet, tdbDays: number, out: Float64Array | number[]): void {
  const p = packed(planet);
  const tau = tdbDays / DAYS_PER_MILLENNIUM;
  const L = evalVariableValue(p.L, tau);
  const B = evalVariableValue(p.B, tau);
  const R = evalVariableValue(p.R, tau);
  const cB = Math.cos(B);
  out[0] = R * cB * Math.cos(L);
  out[1] = R * cB * Math.sin(L);
  out[2] = R * Math.sin(B);
}

const scratch = new Float64Array(6);

/**
 * Heliocentric state of a planet in the VSOP87 frame (dynamical ecliptic and equinox J2000), rectangular,
 * AU and AU/day, at `tdbDays` (TDB days from J2000.0). Writes x, y, z, vx, vy, vz into `out`.
 */
export function vsop87StateInto(planet: Vsop87Planet, tdbDays: number, out: Float64Array | number[]): void {
  const p = packed(planet);
  const tau = tdbDays / DAYS_PER_MILLENNIUM;
  evalVariable(p.L, tau, scratch, 0);
  evalVariable(p.B, tau, scratch, 2);
  evalVariable(p.R, tau, scratch, 4);
  const L = scratch[0];
  const B = scratch[2];
  const R = scratch[4];
  // per day
  const dL = scratch[1] / DAYS_PER_MILLENNIUM;
  const dB = scratch[3] / DAYS_PER_MILLENNIUM;
  const dR = scratch[5] / DAYS_PER_MILLENNIUM;
  const cL = Math.cos(L);
  const sL = Math.sin(L);
  const cB = Math.cos(B);
  const sB = Math.sin(B);
  out[0] = R * cB * cL;
  out[1] = R * cB * sL;
  out[2] = R * sB;
  out[3] = dR * cB * cL - R * sB * dB * cL - R * cB * sL * dL;
  out[4] = dR * cB * sL - R * sB * dB * sL + R * cB * cL * dL;
  out[5] = dR * sB + R * cB * dB;
}

/** Per planet and node pattern: cos and sin of C·Δτ_k for every term (flat, term-major, 2n values per term). */
const OFFSET_TABLES = new Map<string, { L: Float64Array[]; B: Float64Array[]; R: Float64Array[] }>();

function offsetTable(v: PackedVariable, dTau: Float64Array): Float64Array[] {
  const n = dTau.length;
  return v.map((arr) => {
    const terms = arr.length / 3;
    const t = new Float64Array(terms * 2 * n);
    for (let i = 0; i < terms; i++) {
      const c = arr[3 * i + 2];
      for (let k = 0; k < n; k++) {
        t[2 * n * i + k] = Math.cos(c * dTau[k]);
        t[2 * n * i + n + k] = Math.sin(c * dTau[k]);
      }
    }
    return t;
  });
}

function sampleVariable(v: PackedVariable, tab: Float64Array[], tauC: number, dTau: Float64Array, out: Float64Array, acc: Float64Array): void {
  const n = dTau.length;
  out.fill(0, 0, n);
  for (let alpha = 0; alpha < v.length; alpha++) {
    const arr = v[alpha];
    const t = tab[alpha];
    acc.fill(0, 0, n);
    for (let i = 0, j = 0; i < arr.length; i += 3, j += 2 * n) {
      const a = arr[i];
      const phase = arr[i + 1] + arr[i + 2] * tauC;
      const ac = a * Math.cos(phase);
      const as = a * Math.sin(phase);
      for (let k = 0; k < n; k++) acc[k] += ac * t[j + k] - as * t[j + n + k];
    }
    for (let k = 0; k < n; k++) out[k] += Math.pow(tauC + dTau[k], alpha) * acc[k];
  }
}

/**
 * Positions (AU, VSOP87 frame) at n times tdbCenter + offsetsDays[k], written as out[3k..3k+2]. Same values as
 * vsop87PositionInto at each time (cos(φc + CΔτ) by angle addition, exact up to rounding), but with two
 * trigonometric calls per term for all n times instead of n: used to fit the Chebyshev cache, whose node
 * offsets are the same in every granule. `key` identifies the offsets pattern (tables are cached per key).
 */
export function vsop87SampleInto(planet: Vsop87Planet, tdbCenter: number, offsetsDays: Float64Array, key: string, out: Float64Array): void {
  const p = packed(planet);
  const n = offsetsDays.length;
  const dTau = new Float64Array(n);
  for (let k = 0; k < n; k++) dTau[k] = offsetsDays[k] / DAYS_PER_MILLENNIUM;
  const tk = `${planet}|${key}`;
  let tab = OFFSET_TABLES.get(tk);
  if (!tab) {
    tab = { L: offsetTable(p.L, dTau), B: offsetTable(p.B, dTau), R: offsetTable(p.R, dTau) };
    OFFSET_TABLES.set(tk, tab);
  }
  const tauC = tdbCenter / DAYS_PER_MILLENNIUM;
  const L = new Float64Array(n);
  const B = new Float64Array(n);
  const R = new Float64Array(n);
  const acc = new Float64Array(n);
  sampleVariable(p.L, tab.L, tauC, dTau, L, acc);
  sampleVariable(p.B, tab.B, tauC, dTau, B, acc);
  sampleVariable(p.R, tab.R, tauC, dTau, R, acc);
  for (let k = 0; k < n; k++) {
    const cB = Math.cos(B[k]);
    out[3 * k] = R[k] * cB * Math.cos(L[k]);
    out[3 * k + 1] = R[k] * cB * Math.sin(L[k]);
    out[3 * k + 2] = R[k] * Math.sin(B[k]);
  }
}

/**
 * Chunk sampler for the Chebyshev cache (chebyshev.ts): positions at the same n node offsets in K consecutive
 * granules whose centres are `stepDays` apart. Same values as vsop87PositionInto at every node up to rounding:
 * per term, cos/sin of the phase at the first granule centre are computed once, advanced from granule to granule
 * by an exact rotation through C·Δτ (angle addition; its rounding grows by ~1e-16 per step, so K is kept small
 * and every chunk is reseeded), and moved to each node by a second rotation through C·dτ_k taken from a
 * per-term table. So the trigonometric cost is 2 calls per term per chunk instead of one per term and node.
 */
type FlatSeries = SeriesSegments & { A: Float64Array; Ph: Float64Array; C: Float64Array };
const FLAT = new Map<Vsop87Planet, FlatSeries>();

function flat(planet: Vsop87Planet): FlatSeries {
  let f = FLAT.get(planet);
  if (f) return f;
  const p = packed(planet);
  const variables = [p.L, p.B, p.R];
  const total = seriesTermCount(variables, 3);
  const A = new Float64Array(total);
  const Ph = new Float64Array(total);
  const C = new Float64Array(total);
  const seg = flattenSeries(variables, 3, (i, arr, j) => {
    A[i] = arr[j];
    Ph[i] = arr[j + 1];
    C[i] = arr[j + 2];
  });
  f = { A, Ph, C, ...seg };
  FLAT.set(planet, f);
  return f;
}

/** Per planet and (node pattern, granule step): node rotations (2n per term) and the granule step rotation (2 per term). */
const CHUNK_TABLES = new Map<string, { node: Float64Array; step: Float64Array }>();

/**
 * Positions (AU, VSOP87 frame) at times centre0 + g·stepDays + offsetsDays[k] for g < K, k < n, written to
 * out[3(g·n + k) + c]. `key` identifies (offsetsDays, stepDays); tables are cached per planet and key.
 * `acc` is scratch of at least (number of series segments ≤ 18)·K·n doubles.
 */
export function vsop87ChunkPositionsInto(
  planet: Vsop87Planet,
  centre0Days: number,
  stepDays: number,
  K: number,
  offsetsDays: Float64Array,
  key: string,
  out: Float64Array,
  acc: Float64Array,
): void {
  const f = flat(planet);
  const n = offsetsDays.length;
  const nTerms = f.A.length;
  const tk = `${planet}|${key}|${stepDays}`;
  let tab = CHUNK_TABLES.get(tk);
  if (!tab) {
    const node = nodeRotationTable(nTerms, (i) => f.C[i], offsetsDays, DAYS_PER_MILLENNIUM);
    const step = new Float64Array(nTerms * 2);
    for (let i = 0; i < nTerms; i++) {
      const d = (f.C[i] * stepDays) / DAYS_PER_MILLENNIUM;
      step[2 * i] = Math.cos(d);
      step[2 * i + 1] = Math.sin(d);
    }
    tab = { node, step };
    CHUNK_TABLES.set(tk, tab);
  }
  const node = tab.node;
  const step = tab.step;
  const tau0 = centre0Days / DAYS_PER_MILLENNIUM;
  const nSeg = f.segVar.length;
  const Kn = K * n;
  acc.fill(0, 0, nSeg * Kn);
  for (let s = 0; s < nSeg; s++) {
    const base = s * Kn;
    for (let i = f.segStart[s]; i < f.segStart[s + 1]; i++) {
      const a = f.A[i];
      const ph = f.Ph[i] + f.C[i] * tau0;
      let ac = a * Math.cos(ph);
      let as = a * Math.sin(ph);
      const cd = step[2 * i];
      const sd = step[2 * i + 1];
      const j = 2 * n * i;
      for (let g = 0, o = base; g < K; g++, o += n) {
        for (let k = 0; k < n; k++) acc[o + k] += ac * node[j + k] - as * node[j + n + k];
        const nc = ac * cd - as * sd;
        as = as * cd + ac * sd;
        ac = nc;
      }
    }
  }
  combineSegments(f, acc, centre0Days, stepDays, K, offsetsDays, DAYS_PER_MILLENNIUM, (_tau, L, B, R, o) => {
    const cB = Math.cos(B);
    out[o] = R * cB * Math.cos(L);
    out[o + 1] = R * cB * Math.sin(L);
    out[o + 2] = R * Math.sin(B);
  });
}

/** Number of (variable, power) segments of a planet's flattened series (scratch sizing). */
export function vsop87SegmentCount(planet: Vsop87Planet): number {
  return flat(planet).segVar.length;
}
