/**
 * Reference frames (handbook METHODS.md §2).
 *
 * Internal frame: ICRF equatorial, heliocentric. "EME2000" / "J2000 equatorial" input is taken to mean the ICRF
 * axes, as is usual in small-body practice (METHODS §2); the ~20 mas frame bias (≈15 km at 1 AU) is not applied.
 *
 * Elements are exchanged in the J2000 ecliptic, obtained by a rotation about x by the obliquity:
 *   r_ecl = R1(ε) r_eq:  x' = x,  y' = y cos ε + z sin ε,  z' = −y sin ε + z cos ε   (METHODS §2)
 * Default ε: IAU 1976 value 84381.448" (Lieske et al. 1977), the convention of small-body element catalogues.
 */
import { OBLIQUITY_J2000_IAU1976_RAD } from './constants';
import type { Mat3, Vec3 } from './vec';

export const FRAME_CONVENTION =
  'ICRF equatorial (EME2000 treated as ICRF axes; frame bias not applied); elements in the J2000 ecliptic with ' +
  'IAU 1976 obliquity 84381.448"';

/** J2000 ecliptic -> ICRF equatorial (rotation about x by −ε). */
export function eclipticToEquatorial(v: Vec3, obliquityRad: number = OBLIQUITY_J2000_IAU1976_RAD): Vec3 {
  const c = Math.cos(obliquityRad);
  const s = Math.sin(obliquityRad);
  return [v[0], c * v[1] - s * v[2], s * v[1] + c * v[2]];
}

/** ICRF equatorial -> J2000 ecliptic (rotation about x by +ε). */
export function equatorialToEcliptic(v: Vec3, obliquityRad: number = OBLIQUITY_J2000_IAU1976_RAD): Vec3 {
  const c = Math.cos(obliquityRad);
  const s = Math.sin(obliquityRad);
  return [v[0], c * v[1] + s * v[2], -s * v[1] + c * v[2]];
}

/** Matrix of the ecliptic -> equatorial rotation (for covariance rotation: C_eq = R C_ecl Rᵀ). */
export function eclipticToEquatorialMatrix(obliquityRad: number = OBLIQUITY_J2000_IAU1976_RAD): Mat3 {
  const c = Math.cos(obliquityRad);
  const s = Math.sin(obliquityRad);
  return [
    [1, 0, 0],
    [0, c, -s],
    [0, s, c],
  ];
}

/** Elementary rotation matrices (passive, as in the astrodynamics texts): R1 about x, R3 about z. */
export function rotationX(angleRad: number): Mat3 {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  return [
    [1, 0, 0],
    [0, c, s],
    [0, -s, c],
  ];
}

export function rotationZ(angleRad: number): Mat3 {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  return [
    [c, s, 0],
    [-s, c, 0],
    [0, 0, 1],
  ];
}
