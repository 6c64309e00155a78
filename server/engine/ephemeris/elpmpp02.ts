/**
 * ELP/MPP02 lunar theory (Chapront & Francou 2003, A&A 404, 735), the version whose constants were fitted
 * to JPL DE405 ("ElpMppDE405"), as shipped by astronomia 4.2.0 (`astronomia/data/elpMppDe`).
 *
 * The series give the geocentric Moon in spherical coordinates on the mean ecliptic and mean equinox of
 * date (L = W1 + ΣL, in arcsec; B in arcsec; R in km). Laskar's P, Q polynomials then rotate the
 * rectangular vector to the inertial mean ecliptic and equinox of J2000 (ELP/MPP02 documentation,
 * Chapront & Francou 2002, "Lunar solution ELP version ELP/MPP02", §"Reference frame"); astronomia's
 * `elp.Moon.positionXYZ` does the same. That J2000 ecliptic frame is the one of DE405 (ICRF based) to
 * the accuracy of the fit; the final small rotation to ICRF is in frame-tie.ts.
 *
 * Velocities are analytic: d/dT of A·sin(φ(T)) is A·cos(φ)·φ'(T). The time derivative of the P, Q
 * rotation itself (≈1e-5 rad/century, i.e. ≈4 km per century on the 384,000 km vector ≈ 1e-9 km/s)
 * is neglected; it is six orders below the velocity accuracy of the theory.
 */
import elp from 'astronomia/data/elpMppDe';
import { combineSegments, flattenSeries, nodeRotationTable, packVariable, powerSeriesInto, powerSeriesValue, seriesTermCount, type PackedVariable, type SeriesSegments } from './chunk';

const DAYS_PER_CENTURY = 36_525;
const ARCSEC_RAD = Math.PI / (180 * 3600);

// Packed variables (chunk.ts PackedVariable): per power of T, rows of 6 [A, φ0..φ4].
let PACKED: { L: PackedVariable; B: PackedVariable; R: PackedVariable; W1: number[]; termCount: number } | null = null;

function packed() {
  if (!PACKED) {
    const L = packVariable(elp.L, 6, 'ELP');
    const B = packVariable(elp.B, 6, 'ELP');
    const R = packVariable(elp.R, 6, 'ELP');
    const termCount = [...L, ...B, ...R].reduce((s, a) => s + a.length / 6, 0);
    PACKED = { L, B, R, W1: elp.W1.slice(), termCount };
  }
  return PACKED;
}

export const ELP_DATA_NAME: string = elp.name;

export function elpTermCount(): number {
  return packed().termCount;
}

/** Σ_α T^α Σ A sin(φ(T)) and its T-derivative into out[k], out[k + 1] (φ quartic in T). */
function evalVariable(v: PackedVariable, T: number, out: Float64Array, k: number): void {
  powerSeriesInto(v, T, out, k, (arr, sd) => {
    let s = 0;
    let ds = 0;
    for (let i = 0; i < arr.length; i += 6) {
      const a = arr[i];
      const f1 = arr[i + 2];
      const f2 = arr[i + 3];
      const f3 = arr[i + 4];
      const f4 = arr[i + 5];
      const phase = arr[i + 1] + T * (f1 + T * (f2 + T * (f3 + T * f4)));
      const dphase = f1 + T * (2 * f2 + T * (3 * f3 + T * 4 * f4));
      s += a * Math.sin(phase);
      ds += a * Math.cos(phase) * dphase;
    }
    sd[0] = s;
    sd[1] = ds;
  });
}

/** Σ_α T^α Σ A sin(φ(T)) without the derivative. */
function evalVariableValue(v: PackedVariable, T: number): number {
  return powerSeriesValue(v, T, (arr) => {
    let s = 0;
    for (let i = 0; i < arr.length; i += 6) {
      s += arr[i] * Math.sin(arr[i + 1] + T * (arr[i + 2] + T * (arr[i + 3] + T * (arr[i + 4] + T * arr[i + 5]))));
    }
    return s;
  });
}

const scratch = new Float64Array(6);

/**
 * Geocentric Moon, rectangular, on the inertial mean ecliptic and equinox J2000 of ELP/MPP02,
 * in km and km/day, at `tdbDays` (TDB days from J2000.0). With `withVelocity` false the velocity is not
 * computed (half the cost) and out[3..5] are zero.
 */
export function elpMoonGeocentricKmInto(tdbDays: number, out: Float64Array | number[], withVelocity = true): void {
  const p = packed();
  const T = tdbDays / DAYS_PER_CENTURY;
  if (withVelocity) {
    evalVariable(p.L, T, scratch, 0);
    evalVariable(p.B, T, scratch, 2);
    evalVariable(p.R, T, scratch, 4);
  } else {
    scratch.fill(0);
    scratch[0] = evalVariableValue(p.L, T);
    scratch[2] = evalVariableValue(p.B, T);
    scratch[4] = evalVariableValue(p.R, T);
  }
  const w = p.W1;
  const W1 = w[0] + T * (w[1] + T * (w[2] + T * (w[3] + T * w[4])));
  const dW1 = w[1] + T * (2 * w[2] + T * (3 * w[3] + T * 4 * w[4]));
  const L = W1 + scratch[0] * ARCSEC_RAD;
  const B = scratch[2] * ARCSEC_RAD;
  const R = scratch[4];
  const dL = (dW1 + scratch[1] * ARCSEC_RAD) / DAYS_PER_CENTURY;
  const dB = (scratch[3] * ARCSEC_RAD) / DAYS_PER_CENTURY;
  const dR = scratch[5] / DAYS_PER_CENTURY;
  const cL = Math.cos(L);
  const sL = Math.sin(L);
  const cB = Math.cos(B);
  const sB = Math.sin(B);
  const x = R * cB * cL;
  const y = R * cB * sL;
  const z = R * sB;
  const vx = dR * cB * cL - R * sB * dB * cL - R * cB * sL * dL;
  const vy = dR * cB * sL - R * sB * dB * sL + R * cB * cL * dL;
  const vz = dR * sB + R * cB * dB;
  // Laskar's P, Q (ELP/MPP02 documentation; same polynomials as astronomia elp.js positionXYZ).
  const P = laskarP(T);
  const Q = laskarQ(T);
  const sq = Math.sqrt(1 - P * P - Q * Q);
  const p11 = 1 - 2 * P * P;
  const p12 = 2 * P * Q;
  const p13 = 2 * P * sq;
  const p21 = 2 * P * Q;
  const p22 = 1 - 2 * Q * Q;
  const p23 = -2 * Q * sq;
  const p31 = -2 * P * sq;
  const p32 = 2 * Q * sq;
  const p33 = 1 - 2 * P * P - 2 * Q * Q;
  out[0] = p11 * x + p12 * y + p13 * z;
  out[1] = p21 * x + p22 * y + p23 * z;
  out[2] = p31 * x + p32 * y + p33 * z;
  out[3] = p11 * vx + p12 * vy + p13 * vz;
  out[4] = p21 * vx + p22 * vy + p23 * vz;
  out[5] = p31 * vx + p32 * vy + p33 * vz;
}

function laskarP(T: number): number {
  return T * (0.10180391e-4 + T * (0.47020439e-6 + T * (-0.5417367e-9 + T * (-0.2507948e-11 + T * 0.463486e-14))));
}
function laskarQ(T: number): number {
  return T * (-0.113469002e-3 + T * (0.12372674e-6 + T * (0.1265417e-8 + T * (-0.1371808e-11 + T * -0.320334e-14))));
}

/**
 * Geocentric Moon position (km, J2000 ecliptic of the theory, as elpMoonGeocentricKmInto) from the series sums
 * ΣL, ΣB (arcsec) and R (km) at T (Julian centuries TDB); writes out[o..o+2].
 */
function positionFromSumsKm(T: number, sumL: number, sumB: number, R: number, out: Float64Array, o: number): void {
  const w = packed().W1;
  const L = w[0] + T * (w[1] + T * (w[2] + T * (w[3] + T * w[4]))) + sumL * ARCSEC_RAD;
  const B = sumB * ARCSEC_RAD;
  const cB = Math.cos(B);
  const x = R * cB * Math.cos(L);
  const y = R * cB * Math.sin(L);
  const z = R * Math.sin(B);
  const P = laskarP(T);
  const Q = laskarQ(T);
  const sq = Math.sqrt(1 - P * P - Q * Q);
  out[o] = (1 - 2 * P * P) * x + 2 * P * Q * y + 2 * P * sq * z;
  out[o + 1] = 2 * P * Q * x + (1 - 2 * Q * Q) * y - 2 * Q * sq * z;
  out[o + 2] = -2 * P * sq * x + 2 * Q * sq * y + (1 - 2 * P * P - 2 * Q * Q) * z;
}

/** All terms flattened: A, φ0..φ4 per term; segments per (variable L/B/R, power of T). */
type FlatElp = SeriesSegments & { A: Float64Array; F: Float64Array /* 5 per term */ };
let FLAT: FlatElp | null = null;

function flatElp(): FlatElp {
  if (FLAT) return FLAT;
  const p = packed();
  const variables = [p.L, p.B, p.R];
  const total = seriesTermCount(variables, 6);
  const A = new Float64Array(total);
  const F = new Float64Array(total * 5);
  const seg = flattenSeries(variables, 6, (i, arr, j) => {
    A[i] = arr[j];
    for (let q = 0; q < 5; q++) F[5 * i + q] = arr[j + 1 + q];
  });
  FLAT = { A, F, ...seg };
  return FLAT;
}

/** Number of (variable, power) segments of the flattened series (scratch sizing). */
export function elpSegmentCount(): number {
  return flatElp().segVar.length;
}

/** Per node pattern: cos and sin of φ1·dT_k for every term (2n per term). */
const NODE_TABLES = new Map<string, Float64Array>();

/**
 * Chunk sampler for the Chebyshev cache: geocentric Moon positions (km, J2000 ecliptic of the theory; the same
 * values as elpMoonGeocentricKmInto up to rounding and the bound below) at times centre0 + g·stepDays + offsetsDays[k],
 * g < K, k < n, into out[3(g·n + k) + c].
 *
 * Method (the phases are quartic polynomials φ(T), not linear as in VSOP87): with T0 the first granule centre,
 * u_g = g·Δ and dT_k the node offset (centuries), w = u_g + dT_k,
 *   φ(T0 + w) = φ(T0) + φ'(T0)·u_g + φ1·dT_k + ε,  ε = (φ'(T0) − φ1)·dT_k + φ''(T0)/2·w² + O(w³).
 * The first three parts are exact rotations (a seed from 2 trigonometric calls per term and chunk, a granule step
 * rotation through φ'(T0)·Δ from 2 more calls, and a per-term table of φ1·dT_k); ε enters to second order:
 * sin(a + ε) ≈ sin a + ε·cos a − ε²/2·sin a. Bounds (ELP/MPP02 DE405 data: |φ2| ≤ 1e-3 rad/cy², |φ3| ≤ 1.5e-6,
 * |φ4| ≤ 7.5e-9): for |T0| ≤ 3 cy, dT ≤ 1.1e-4 cy (8-day granules) and w ≤ 0.0036 cy (K = 16), |ε| ≤ 7e-7 rad,
 * so the neglected ε³/6 is ~1e-19 of the largest amplitude (22640″ in L, 20905 km in R); the neglected cubic
 * φ'''/6·w³ ≤ 1e-13 rad of phase: < 0.001 mm.
 * `acc` is scratch of at least (segments ≤ 12)·K·n + 2·K·n doubles.
 */
export function elpChunkPositionsKmInto(
  centre0Days: number,
  stepDays: number,
  K: number,
  offsetsDays: Float64Array,
  key: string,
  out: Float64Array,
  acc: Float64Array,
): void {
  const f = flatElp();
  const n = offsetsDays.length;
  const nTerms = f.A.length;
  let node = NODE_TABLES.get(key);
  if (!node) {
    node = nodeRotationTable(nTerms, (i) => f.F[5 * i + 1], offsetsDays, DAYS_PER_CENTURY);
    NODE_TABLES.set(key, node);
  }
  const nSeg = f.segVar.length;
  const Kn = K * n;
  const T0 = centre0Days / DAYS_PER_CENTURY;
  const dG = stepDays / DAYS_PER_CENTURY;
  // per (g, k): dT_k and w², stored after the accumulators
  const dTo = nSeg * Kn;
  const w2o = dTo + Kn;
  for (let g = 0; g < K; g++) {
    for (let k = 0; k < n; k++) {
      const dT = offsetsDays[k] / DAYS_PER_CENTURY;
      const w = g * dG + dT;
      acc[dTo + g * n + k] = dT;
      acc[w2o + g * n + k] = w * w;
    }
  }
  acc.fill(0, 0, nSeg * Kn);
  const F = f.F;
  for (let s = 0; s < nSeg; s++) {
    const base = s * Kn;
    for (let i = f.segStart[s]; i < f.segStart[s + 1]; i++) {
      const a = f.A[i];
      const p0 = F[5 * i];
      const p1 = F[5 * i + 1];
      const p2 = F[5 * i + 2];
      const p3 = F[5 * i + 3];
      const p4 = F[5 * i + 4];
      const ph = p0 + T0 * (p1 + T0 * (p2 + T0 * (p3 + T0 * p4)));
      const e1 = T0 * (2 * p2 + T0 * (3 * p3 + T0 * 4 * p4)); // φ'(T0) − φ1
      const a2 = p2 + T0 * (3 * p3 + T0 * 6 * p4); // φ''(T0)/2
      let as = a * Math.sin(ph);
      let ac = a * Math.cos(ph);
      const st = (p1 + e1) * dG;
      const cd = Math.cos(st);
      const sd = Math.sin(st);
      const j = 2 * n * i;
      for (let g = 0, o = 0; g < K; g++, o += n) {
        for (let k = 0; k < n; k++) {
          const ck = node[j + k];
          const sk = node[j + n + k];
          const sinA = as * ck + ac * sk; // A·sin(φ(T0) + φ'(T0)·u_g + φ1·dT_k)
          const cosA = ac * ck - as * sk;
          const eps = e1 * acc[dTo + o + k] + a2 * acc[w2o + o + k];
          acc[base + o + k] += sinA + eps * (cosA - 0.5 * eps * sinA);
        }
        const nc = ac * cd - as * sd;
        as = as * cd + ac * sd;
        ac = nc;
      }
    }
  }
  combineSegments(f, acc, centre0Days, stepDays, K, offsetsDays, DAYS_PER_CENTURY, (T, L, B, R, o) => positionFromSumsKm(T, L, B, R, out, o));
}
