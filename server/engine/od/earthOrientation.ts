/**
 * Earth orientation for observer positions (METHODS.md §9.4; IERS Conventions 2010, ch. 5 [M]).
 *
 * Terrestrial -> celestial, equinox-based form (equivalent to Q R W of the CIO-based form to the level of the
 * models used):
 *   r_GCRS ≈ Pᵀ(t) Nᵀ(t) R3(−GAST) r_ITRS          (polar motion W neglected, ~10 m; METHODS.md §9.4)
 * - Earth rotation angle ERA(UT1), IERS 2010 eq. 5.15 (earthRotationAngleRad). UT1 = UTC + (UT1 − UTC), the latter
 *   one value per fit given by the analyst from the IERS bulletins (fit setting ut1MinusUtcSeconds, observer.ts),
 *   0 by default: |UT1 − UTC| ≤ 0.9 s while leap seconds continue, i.e. ≤ 0.4 km of site position along the
 *   equator (METHODS.md §9.4); at 0.05 AU that is ≤ 0.011", but for an object at 0.003 AU it shifts the fitted
 *   state by several sigma (tests/unit/od-ut1.test.ts). No Bulletin A table is kept.
 * - GMST = ERA + the IAU 2006 polynomial of IERS 2010 eq. 5.32 (gmstRad); GAST = GMST + Δψ cos ε_A (equation of
 *   the equinoxes; the complementary terms, ≤ 3 mas, are omitted).
 * - Precession P: IAU 2006 (Capitaine, Wallace & Chapront 2003 P03 angles ψ_A, ω_A, χ_A) and nutation N: the five
 *   largest terms of IAU 2000B, both as implemented by astronomy-engine 2.1.19 (Rotation_EQD_EQJ, e_tilt; read in
 *   node_modules/astronomy-engine/astronomy.js). The omitted nutation terms are each below 0.08" (recalled from
 *   memory: the largest omitted one, in l, is 0.071" in Δψ) and together well below 1": that rotates the 6378 km site
 *   vector by less than 3 cm, which is nothing for the direction to an asteroid.
 * - Frame bias (~23 mas between the mean J2000 equator and the ICRS, METHODS.md §2) is neglected: 0.7 m on the site.
 * So the site vector in GCRS is good to the UT1 − UTC term (≤ 0.4 km when not given) and polar motion (~10 m); the precession-
 * nutation part is good to centimetres.
 */
import { AstroTime, Rotation_EQD_EQJ, e_tilt } from 'astronomy-engine';
import { DAY_S } from '../constants';
import type { Mat3, Vec3 } from '../vec';
import { dayIndexFromCalendar, ttDaysFromTdbDays, utcCalendarFromTdbDays } from '../time';

const TWO_PI = 2 * Math.PI;
const ARCSEC = Math.PI / (180 * 3600);

/** dERA/dt in rad per UT1 day (IERS 2010 eq. 5.15: 2π · 1.00273781191135448). */
export const EARTH_ROTATION_RATE_RAD_PER_DAY = TWO_PI * 1.00273781191135448;

/**
 * Earth rotation angle (rad, in [0, 2π)) for UT1 days since J2000 (JD_UT1 − 2451545.0), IERS 2010 eq. 5.15:
 *   ERA = 2π (0.7790572732640 + 1.00273781191135448 Du).
 * Written as 2π(frac(Du) + 0.7790572732640 + 0.00273781191135448 Du) to keep precision (as SOFA's eraEra00).
 */
export function earthRotationAngleRad(ut1Days: number): number {
  const frac = ut1Days - Math.floor(ut1Days);
  const turns = frac + 0.779057273264 + 0.00273781191135448 * ut1Days;
  const a = TWO_PI * (turns - Math.floor(turns));
  return a;
}

/**
 * UT1 days since J2000 for a TDB instant, taking UT1 = UTC (documented approximation above). Inside a leap second
 * UTC is continued across 23:59:60 (one second of UT1 at most).
 */
export function ut1DaysFromTdbDays(tdbDays: number): number {
  const c = utcCalendarFromTdbDays(tdbDays);
  const dayIndex = dayIndexFromCalendar(c.year, c.month, c.day);
  return dayIndex - 0.5 + (c.hour * 3600 + c.minute * 60 + c.second) / DAY_S;
}

/**
 * Greenwich mean sidereal time (rad, [0, 2π)) consistent with IAU 2006 precession, IERS 2010 eq. 5.32:
 *   GMST = ERA(UT1) + 0.014506" + 4612.156534" t + 1.3915817" t² − 0.00000044" t³ − 0.000029956" t⁴ − 0.0000000368" t⁵,
 * t in Julian centuries of TT since J2000.
 */
export function gmstRad(ut1Days: number, ttDays: number): number {
  const t = ttDays / 36525;
  const poly = 0.014506 + t * (4612.156534 + t * (1.3915817 + t * (-0.00000044 + t * (-0.000029956 + t * -0.0000000368))));
  const g = earthRotationAngleRad(ut1Days) + poly * ARCSEC;
  return g - TWO_PI * Math.floor(g / TWO_PI);
}

/** Equation of the equinoxes Δψ cos ε_A (rad), nutation from astronomy-engine (see the module comment). */
export function equationOfEquinoxesRad(ttDays: number): number {
  // e_tilt(...).ee is in seconds of time.
  return e_tilt(AstroTime.FromTerrestrialTime(ttDays)).ee * 15 * ARCSEC;
}

/** Greenwich apparent sidereal time (rad, [0, 2π)). */
export function gastRad(ut1Days: number, ttDays: number): number {
  const g = gmstRad(ut1Days, ttDays) + equationOfEquinoxesRad(ttDays);
  return g - TWO_PI * Math.floor(g / TWO_PI);
}

/** Rotation from the true equator and equinox of date to the J2000 mean equator (≈ GCRS axes), = Pᵀ Nᵀ. */
export function trueOfDateToCelestialMatrix(ttDays: number): Mat3 {
  const r = Rotation_EQD_EQJ(AstroTime.FromTerrestrialTime(ttDays)).rot;
  // astronomy-engine stores rot[i][j] so that v'_j = Σ_i v_i rot[i][j] (RotateVector); transpose to row-major M v.
  return [
    [r[0][0], r[1][0], r[2][0]],
    [r[0][1], r[1][1], r[2][1]],
    [r[0][2], r[1][2], r[2][2]],
  ];
}

/**
 * Nutation matrix N (mean equator and equinox of date -> true of date), R1(−ε_A − Δε) R3(−Δψ) R1(ε_A), from the
 * same astronomy-engine angles (e_tilt). Exposed for checks: Pᵀ = trueOfDateToCelestialMatrix · N.
 */
export function nutationMatrix(ttDays: number): Mat3 {
  const et = e_tilt(AstroTime.FromTerrestrialTime(ttDays));
  const deg = Math.PI / 180;
  const r1 = (a: number): Mat3 => [[1, 0, 0], [0, Math.cos(a), Math.sin(a)], [0, -Math.sin(a), Math.cos(a)]];
  const r3 = (a: number): Mat3 => [[Math.cos(a), Math.sin(a), 0], [-Math.sin(a), Math.cos(a), 0], [0, 0, 1]];
  return matMul(matMul(r1(-et.tobl * deg), r3(-et.dpsi * ARCSEC)), r1(et.mobl * deg));
}

function matMul(a: Mat3, b: Mat3): Mat3 {
  const row = (i: number): Vec3 => [0, 1, 2].map((j) => a[i][0] * b[0][j] + a[i][1] * b[1][j] + a[i][2] * b[2][j]) as Vec3;
  return [row(0), row(1), row(2)];
}

export type EarthOrientation = {
  tdbDays: number;
  ut1Days: number;
  gastRad: number;
  /** True of date -> celestial (Pᵀ Nᵀ). */
  precessionNutation: Mat3;
};

/**
 * Orientation at a TDB instant. `ut1DaysOverride` replaces the UT1 = UTC approximation (tests use it to compare with
 * a reference tool's own UT1; a caller with a UT1 − UTC table can pass UT1 too).
 */
export function earthOrientationAt(tdbDays: number, ut1DaysOverride?: number): EarthOrientation {
  const ttDays = ttDaysFromTdbDays(tdbDays);
  const ut1Days = ut1DaysOverride ?? ut1DaysFromTdbDays(tdbDays);
  return { tdbDays, ut1Days, gastRad: gastRad(ut1Days, ttDays), precessionNutation: trueOfDateToCelestialMatrix(ttDays) };
}

/**
 * Site position (km) and velocity (km/s) in the GCRS for an Earth-fixed vector r_ITRS (km):
 *   r = PᵀNᵀ R3(−GAST) r_ITRS,  v = PᵀNᵀ (ω ẑ × R3(−GAST) r_ITRS),  ω = dERA/dt per UT1 day (≈ per TDB day; the
 * 1e-8 rate difference and the precession rate are negligible for a velocity of ≤ 0.47 km/s).
 */
export function siteGcrsKm(siteItrsKm: Vec3, eo: EarthOrientation): { positionKm: Vec3; velocityKmS: Vec3 } {
  const c = Math.cos(eo.gastRad);
  const s = Math.sin(eo.gastRad);
  const [x, y, z] = siteItrsKm;
  const tod: Vec3 = [c * x - s * y, s * x + c * y, z];
  const w = EARTH_ROTATION_RATE_RAD_PER_DAY / DAY_S;
  const vtod: Vec3 = [-w * tod[1], w * tod[0], 0];
  const m = eo.precessionNutation;
  const mul = (v: Vec3): Vec3 => [
    m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
    m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
    m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
  ];
  return { positionKm: mul(tod), velocityKmS: mul(vtod) };
}
