/**
 * b-plane (Öpik frame) coordinates from a planet-centred state (METHODS.md §5.2; Kizner 1961; Öpik 1976;
 * Valsecchi, Milani, Gronchi & Chesley 2003, A&A 408, 1179; equations as in Farnocchia et al. 2019, CeMDA 131, 36):
 *
 *   h = r x v,  v_inf = sqrt(v^2 - 2 mu / r),  e_vec = (v x h)/mu - r/|r|,  P = e_vec/e,  Q = h^ x P
 *   S = (P + sqrt(e^2 - 1) Q)/e      unit vector along the INCOMING asymptote (direction of the velocity far before CA)
 *   B = (S x h)/v_inf,  |B| = h/v_inf  impact-parameter vector (from the planet's centre to where the incoming
 *                                       asymptote crosses the plane through the centre normal to S)
 *   xi^   = (v_P x S)/|v_P x S|         v_P = heliocentric velocity of the planet
 *   zeta^ = xi^ x S
 *   xi = B . xi^,  zeta = B . zeta^
 *
 * Convention: zeta^ points OPPOSITE to the projection of the planet's heliocentric velocity on the b-plane
 * (zeta^ . v_P = -|v_P x S| < 0), as in Valsecchi et al. 2003. Thus zeta > 0 means the small body passes
 * "behind" the planet (it arrives late), zeta < 0 ahead of it (early); xi is, to first order, the signed
 * local MOID. The frame (xi^, zeta^, S) is fixed by the incoming asymptote, so in the two-body approximation
 * xi and zeta do not depend on where along the hyperbola they are evaluated.
 *
 * The b-plane exists only for a hyperbolic planet-centred orbit (e > 1); for e <= 1 this returns null.
 */
import type { Vec3 } from './types';

export type BPlane = {
  xiKm: number;
  zetaKm: number;
  /** |B| = h / v_inf. */
  bKm: number;
  vInfinityKmS: number;
  /** Planet-centred eccentricity. */
  eccentricity: number;
  /** Unit vector of the incoming asymptote (planet-centred frame axes). */
  incomingAsymptote: Vec3;
};

function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}
function norm(a: Vec3): number {
  return Math.sqrt(dot(a, a));
}
function scale(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}

/**
 * relPositionKm / relVelocityKmS: small body minus planet (km, km/s); muKm3S2: planet GM;
 * planetVelocityKmS: the planet's heliocentric velocity (km/s), which orients xi and zeta.
 */
export function bPlaneFromState(relPositionKm: Vec3, relVelocityKmS: Vec3, muKm3S2: number, planetVelocityKmS: Vec3): BPlane | null {
  const r = relPositionKm, v = relVelocityKmS, mu = muKm3S2;
  const rn = norm(r);
  const v2 = dot(v, v);
  const vInf2 = v2 - (2 * mu) / rn;
  if (!(vInf2 > 0)) return null;
  const vInf = Math.sqrt(vInf2);
  const h = cross(r, v);
  const hn = norm(h);
  if (hn === 0) {
    // Rectilinear (head-on) trajectory: B = 0, asymptote along -r^ (incoming).
    const S = scale(r, -1 / rn);
    return { xiKm: 0, zetaKm: 0, bKm: 0, vInfinityKmS: vInf, eccentricity: Infinity, incomingAsymptote: S };
  }
  const vxh = cross(v, h);
  const eVec: Vec3 = [vxh[0] / mu - r[0] / rn, vxh[1] / mu - r[1] / rn, vxh[2] / mu - r[2] / rn];
  const e = norm(eVec);
  if (!(e > 1)) return null;
  const P = scale(eVec, 1 / e);
  const Q = cross(scale(h, 1 / hn), P);
  const se = Math.sqrt(e * e - 1);
  const S: Vec3 = [(P[0] + se * Q[0]) / e, (P[1] + se * Q[1]) / e, (P[2] + se * Q[2]) / e];
  const B = scale(cross(S, h), 1 / vInf);
  const vpxS = cross(planetVelocityKmS, S);
  const xiHat = scale(vpxS, 1 / norm(vpxS));
  const zetaHat = cross(xiHat, S);
  return {
    xiKm: dot(B, xiHat),
    zetaKm: dot(B, zetaHat),
    bKm: hn / vInf,
    vInfinityKmS: vInf,
    eccentricity: e,
    incomingAsymptote: S,
  };
}

/**
 * Capture (gravitational-focusing) radius b = R sqrt(1 + v_esc^2 / v_inf^2), v_esc^2 = 2 GM / R
 * (Öpik 1976; Farnocchia et al. 2019 eqs. 13–14; METHODS.md §5.2). An impact occurs if xi^2 + zeta^2 <= b^2.
 */
export function captureRadiusKm(radiusKm: number, muKm3S2: number, vInfinityKmS: number): number {
  return radiusKm * Math.sqrt(1 + (2 * muKm3S2) / radiusKm / (vInfinityKmS * vInfinityKmS));
}
