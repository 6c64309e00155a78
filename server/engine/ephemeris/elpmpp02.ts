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

const DAYS_PER_CENTURY = 36_525;
const ARCSEC_RAD = Math.PI / (180 * 3600);

type PackedVariable = Float64Array[]; // per power of T: rows of 6 [A, φ0..φ4]

function packVariable(v: Record<string, number[][]>): PackedVariable {
  const powers = Object.keys(v)
    .map(Number)
    .sort((a, b) => a - b);
  const out: PackedVariable = [];
  for (const p of powers) {
    if (p !== out.length) throw new Error(`ELP data: missing power ${out.length}`);
    const rows = v[String(p)];
    const arr = new Float64Array(rows.length * 6);
    rows.forEach((r, i) => {
      for (let j = 0; j < 6; j++) arr[6 * i + j] = r[j] ?? 0;
    });
    out.push(arr);
  }
  return out;
}

let PACKED: { L: PackedVariable; B: PackedVariable; R: PackedVariable; W1: number[]; termCount: number } | null = null;

function packed() {
  if (!PACKED) {
    const L = packVariable(elp.L);
    const B = packVariable(elp.B);
    const R = packVariable(elp.R);
    const termCount = [...L, ...B, ...R].reduce((s, a) => s + a.length / 6, 0);
    PACKED = { L, B, R, W1: elp.W1.slice(), termCount };
  }
  return PACKED;
}

export const ELP_DATA_NAME: string = elp.name;

export function elpTermCount(): number {
  return packed().termCount;
}

function evalVariable(v: PackedVariable, T: number, out: Float64Array, k: number): void {
  let value = 0;
  let deriv = 0;
  let tPow = 1;
  let tPowM1 = 0;
  for (let alpha = 0; alpha < v.length; alpha++) {
    const arr = v[alpha];
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
    value += tPow * s;
    deriv += tPowM1 * s + tPow * ds;
    tPowM1 = (alpha + 1) * tPow;
    tPow *= T;
  }
  out[k] = value;
  out[k + 1] = deriv;
}

function evalVariableValue(v: PackedVariable, T: number): number {
  let value = 0;
  let tPow = 1;
  for (let alpha = 0; alpha < v.length; alpha++) {
    const arr = v[alpha];
    let s = 0;
    for (let i = 0; i < arr.length; i += 6) {
      s += arr[i] * Math.sin(arr[i + 1] + T * (arr[i + 2] + T * (arr[i + 3] + T * (arr[i + 4] + T * arr[i + 5]))));
    }
    value += tPow * s;
    tPow *= T;
  }
  return value;
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
  const P = T * (0.10180391e-4 + T * (0.47020439e-6 + T * (-0.5417367e-9 + T * (-0.2507948e-11 + T * 0.463486e-14))));
  const Q = T * (-0.113469002e-3 + T * (0.12372674e-6 + T * (0.1265417e-8 + T * (-0.1371808e-11 + T * -0.320334e-14))));
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
