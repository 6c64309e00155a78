/**
 * Marsden–Sekanina–Yeomans non-gravitational acceleration (Marsden, Sekanina & Yeomans 1973, AJ 78, 211;
 * METHODS.md §4.3):  a_NG = g(r) (A1 r^ + A2 t^ + A3 n^),  r^ = r/|r|, n^ = (r x v)/|r x v|, t^ = n^ x r^.
 */
import { MSY_WATER_ICE } from '../constants';
import type { NonGravParams } from './types';

/** Water-ice g(r) = alpha (r/r0)^-m (1 + (r/r0)^n)^-k, r in AU; g(1 AU) ~ 1 (MSY 1973). */
export function gWaterIce(rAu: number): number {
  const { alpha, r0Au, m, n, k } = MSY_WATER_ICE;
  const q = rAu / r0Au;
  return alpha * Math.pow(q, -m) * Math.pow(1 + Math.pow(q, n), -k);
}

/** Inverse-square law g(r) = (1 AU / r)^2 (alpha = 1, m = 2, n = k = 0 in the MSY form). */
export function gInverseSquare(rAu: number): number {
  return 1 / (rAu * rAu);
}

export function gOfR(law: NonGravParams['law'], rAu: number): number {
  return law === 'water-ice' ? gWaterIce(rAu) : gInverseSquare(rAu);
}

/**
 * Adds the non-gravitational acceleration of particle `i` (state in x, v at offset 3i) to out[3i..3i+2].
 * a1, a2, a3 in AU/d^2.
 */
export function addNonGravInto(
  law: NonGravParams['law'],
  a1: number,
  a2: number,
  a3: number,
  x: Float64Array,
  v: Float64Array,
  i: number,
  out: Float64Array,
): void {
  const o = 3 * i;
  const rx = x[o], ry = x[o + 1], rz = x[o + 2];
  const vx = v[o], vy = v[o + 1], vz = v[o + 2];
  const r = Math.sqrt(rx * rx + ry * ry + rz * rz);
  const g = gOfR(law, r);
  // r^
  const ux = rx / r, uy = ry / r, uz = rz / r;
  // n^ = (r x v)/|r x v|
  let nx = ry * vz - rz * vy, ny = rz * vx - rx * vz, nz = rx * vy - ry * vx;
  const hn = Math.sqrt(nx * nx + ny * ny + nz * nz);
  if (hn === 0) {
    // Radial motion: transverse and normal directions undefined; apply A1 only.
    out[o] += g * a1 * ux;
    out[o + 1] += g * a1 * uy;
    out[o + 2] += g * a1 * uz;
    return;
  }
  nx /= hn; ny /= hn; nz /= hn;
  // t^ = n^ x r^
  const tx = ny * uz - nz * uy, ty = nz * ux - nx * uz, tz = nx * uy - ny * ux;
  out[o] += g * (a1 * ux + a2 * tx + a3 * nx);
  out[o + 1] += g * (a1 * uy + a2 * ty + a3 * ny);
  out[o + 2] += g * (a1 * uz + a2 * tz + a3 * nz);
}
