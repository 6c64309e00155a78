/**
 * Frame tie: from the frames of the analytic theories to ICRF equatorial axes.
 *
 * Planets (VSOP87, dynamical ecliptic and equinox J2000 of VSOP82/DE200):
 *   r_ICRF = M_VSOP87→FK5 · (r + θ_b(t) × r)
 * - M_VSOP87→FK5 is the rotation printed in the VSOP87 documentation (Bretagnon & Francou 1988; handbook
 *   METHODS.md §2 [C]): ε = 23°26′21.4091″ about x and ψ = −0.0990″ about z.
 * - θ_b(t) = θ0_b + θ1_b·T (T in Julian centuries TDB from J2000) is a small rotation vector on the VSOP87
 *   ecliptic axes, FITTED by least squares against Debian's swetest (Swiss Ephemeris files compressed from
 *   JPL DE431, ICRF axes) over 1950–2150 — see tests/reference/fit-ephemeris-frame-tie.ts and `FRAME_TIE_FIT` below.
 *   Its constant part is the residual frame offset VSOP87/FK5 → ICRS (tens of mas: FK5 → ICRS alone is
 *   20–25 mas, Hilton & Hohenkerk 2004); its rate part absorbs the drift in mean longitude of VSOP87 (fitted
 *   in 1988 to DE200) against the DE4xx ephemerides, 10–100 mas per century for the inner planets.
 *   Both are measured, not published numbers: the fit used epochs 1950–2150 and the unit tests check other
 *   epochs in the same span. Outside 1950–2150 the rate term is an extrapolation.
 *
 * Moon (ELP/MPP02 DE405 version, inertial mean ecliptic and equinox J2000 of the theory):
 *   r_ICRF = R1(−ε) · (r + θ_moon × r), ε = 84381.406″ (IAU 2006, Capitaine et al. 2003), θ_moon constant, fitted
 *   the same way against swetest's geocentric Moon. At the Moon's distance 1 mas is 1.9 m, so this tie matters
 *   only at the 0.1 km level; the theory's own error (≈0.1–0.2 km) dominates.
 *
 * Rotations are applied to first order in θ (|θ| < 1e-5 rad, so the second-order term is below 1e-10 of
 * |r|: < 0.5 m for the inner planets and Moon, < 0.5 km for Neptune, far below the theories' own errors).
 * Velocities get θ × v + θ̇ × r.
 */
import type { Vsop87Planet } from './vsop87';

const MAS_RAD = Math.PI / (180 * 3600 * 1000);
const DAYS_PER_CENTURY = 36_525;

/** VSOP87 documentation: rotation from the VSOP87 ecliptic frame to FK5 J2000 equatorial (row-major). */
export const VSOP87_TO_FK5: readonly number[] = Object.freeze([
  1.0, 0.00000044036, -0.000000190919,
  -0.000000479966, 0.917482137087, -0.397776982902,
  0.0, 0.397776982902, 0.917482137087,
]);

const EPS_2006_RAD = (84381.406 / 3600) * (Math.PI / 180);
/** R1(−ε) with ε = 84381.406″: ecliptic J2000 → equatorial (row-major). */
export const ELP_ECLIPTIC_TO_EQUATORIAL: readonly number[] = Object.freeze([
  1, 0, 0,
  0, Math.cos(EPS_2006_RAD), -Math.sin(EPS_2006_RAD),
  0, Math.sin(EPS_2006_RAD), Math.cos(EPS_2006_RAD),
]);

export type SmallRotation = {
  /** rotation vector at J2000, mas, on the theory's ecliptic axes */
  theta0Mas: readonly [number, number, number];
  /** its rate, mas per Julian century */
  theta1MasPerCentury: readonly [number, number, number];
};

/**
 * Fitted small rotations (output of `npx tsx tests/reference/fit-ephemeris-frame-tie.ts`, pasted here unchanged).
 * Fit: linear least squares of swetest ICRS positions (`-j2000 -true -icrs -fxss`; heliocentric planets, geocentric
 * Moon; JD TT) against the series, 200 epochs evenly spaced over JD(TT) 2433282.5–2506332.5 (1950-01-01 to
 * 2150-01-01). Residuals at the fit epochs (max / rms), doc matrix alone → with this rotation:
 *   Mercury 17.9/7.5 → 11.0/4.3 km; Venus 22.9/12.8 → 3.8/1.6 km; Earth 29.2/18.4 → 8.2/2.4 km;
 *   Mars 214/94 → 55/21 km; Jupiter 1781/1023 → 323/161 km; Saturn 2412/1446 → 1042/491 km;
 *   Uranus 21763/12189 → 22479/12104 km (no gain: VSOP87's own error); Neptune 44952/33807 → 13172/8958 km;
 *   Moon (geocentric, ε2006 alone) 0.208/0.103 → 0.152/0.082 km.
 * The constant parts for Mercury, Earth and Mars agree on ≈18 mas about the ecliptic y axis (a tilt of the VSOP87
 * ecliptic against the ICRS-based one); the z (longitude) parts and rates differ per body: they are mean-longitude
 * errors of the theory against DE431, not frame.
 */
export const FRAME_TIE_FIT: Readonly<Record<Vsop87Planet | 'moon', SmallRotation>> = Object.freeze({
  mercury: { theta0Mas: [-1.106, 18.329, -3.426], theta1MasPerCentury: [-2.155, 0.588, -17.832] },
  venus: { theta0Mas: [5.095, 3.835, 9.206], theta1MasPerCentury: [1.221, -2.789, 21.559] },
  earth: { theta0Mas: [1.498, 18.400, 10.820], theta1MasPerCentury: [-2.020, -0.674, 16.749] },
  mars: { theta0Mas: [1.827, 17.802, 13.088], theta1MasPerCentury: [-0.526, -4.027, 95.093] },
  jupiter: { theta0Mas: [-28.323, 82.988, -129.505], theta1MasPerCentury: [-10.980, -3.831, -203.055] },
  saturn: { theta0Mas: [2.874, -3.836, -133.263], theta1MasPerCentury: [-3.433, 0.902, -105.850] },
  uranus: { theta0Mas: [55.773, 6.572, 113.276], theta1MasPerCentury: [-8.021, 2.957, -38.303] },
  neptune: { theta0Mas: [-32.481, 80.880, -822.042], theta1MasPerCentury: [-22.505, -21.528, -1066.470] },
  moon: { theta0Mas: [2.379, -20.432, -30.206], theta1MasPerCentury: [0, 0, 0] },
});

export const FRAME_TIE_DESCRIPTION =
  'VSOP87 -> FK5 rotation of the VSOP87 documentation (eps 23d26m21.4091s, psi -0.0990") followed by a small ' +
  'per-body rotation (constant + linear rate, tens of mas) fitted to swetest/DE431 ICRS positions 1950-2150; ' +
  'ELP/MPP02 J2000 ecliptic -> equatorial with eps 84381.406" plus a fitted constant rotation';

/**
 * Applies r' = M·(r + θ×r), v' = M·(v + θ×v + θ̇×r) in place on a 6-vector (position, velocity; any units,
 * velocity per day). `rot` null means the identity small rotation.
 */
export function applyTieInPlace(state: Float64Array | number[], matrix: readonly number[], rot: SmallRotation | null, tdbDays: number): void {
  let x = state[0];
  let y = state[1];
  let z = state[2];
  let vx = state[3];
  let vy = state[4];
  let vz = state[5];
  if (rot) {
    const T = tdbDays / DAYS_PER_CENTURY;
    const a = (rot.theta0Mas[0] + rot.theta1MasPerCentury[0] * T) * MAS_RAD;
    const b = (rot.theta0Mas[1] + rot.theta1MasPerCentury[1] * T) * MAS_RAD;
    const c = (rot.theta0Mas[2] + rot.theta1MasPerCentury[2] * T) * MAS_RAD;
    const da = (rot.theta1MasPerCentury[0] * MAS_RAD) / DAYS_PER_CENTURY;
    const db = (rot.theta1MasPerCentury[1] * MAS_RAD) / DAYS_PER_CENTURY;
    const dc = (rot.theta1MasPerCentury[2] * MAS_RAD) / DAYS_PER_CENTURY;
    const nx = x + (b * z - c * y);
    const ny = y + (c * x - a * z);
    const nz = z + (a * y - b * x);
    const nvx = vx + (b * vz - c * vy) + (db * z - dc * y);
    const nvy = vy + (c * vx - a * vz) + (dc * x - da * z);
    const nvz = vz + (a * vy - b * vx) + (da * y - db * x);
    x = nx;
    y = ny;
    z = nz;
    vx = nvx;
    vy = nvy;
    vz = nvz;
  }
  const m = matrix;
  state[0] = m[0] * x + m[1] * y + m[2] * z;
  state[1] = m[3] * x + m[4] * y + m[5] * z;
  state[2] = m[6] * x + m[7] * y + m[8] * z;
  state[3] = m[0] * vx + m[1] * vy + m[2] * vz;
  state[4] = m[3] * vx + m[4] * vy + m[5] * vz;
  state[5] = m[6] * vx + m[7] * vy + m[8] * vz;
}
