/**
 * Observatory geometry (METHODS.md §9.4): parallax constants and the Earth-fixed site vector.
 *
 * Ellipsoid: WGS84, a = 6378.137 km, f = 1/298.257223563 (NIMA TR8350.2 [M]; the values are also in METHODS.md §10).
 * The parallax constants rho cos phi', rho sin phi' are in units of that equatorial radius; a table that gives
 * parallax constants computed with another radius (e.g. IERS 2010's 6378.1366 km) differs by 0.46 m at most,
 * which is far below anything the fit can see.
 *
 * Earth-fixed frame: the ITRS axes (x toward longitude 0 on the equator, z toward the pole), polar motion
 * neglected (~10 m; METHODS.md §9.4).
 */
import type { Observatory } from '../../../shared/schemas/od';
import type { Vec3 } from '../vec';

/** WGS84 equatorial radius, km. */
export const WGS84_A_KM = 6378.137;
/** WGS84 flattening. */
export const WGS84_F = 1 / 298.257223563;

const DEG = Math.PI / 180;

export type ParallaxConstants = {
  /** rho cos phi' (units of the equatorial radius). */
  rhoCosPhi: number;
  /** rho sin phi' (units of the equatorial radius). */
  rhoSinPhi: number;
};

/**
 * Parallax constants from geodetic latitude and height above the ellipsoid (Explanatory Supplement /
 * Astronomical Almanac, METHODS.md §9.4):
 *   C = 1/sqrt(cos²φ + (1−f)² sin²φ), S = (1−f)² C, ρcosφ' = (C + h/a) cos φ, ρsinφ' = (S + h/a) sin φ.
 */
export function parallaxFromGeodetic(geodeticLatitudeDeg: number, heightM: number): ParallaxConstants {
  const phi = geodeticLatitudeDeg * DEG;
  const cos = Math.cos(phi);
  const sin = Math.sin(phi);
  const b2 = (1 - WGS84_F) * (1 - WGS84_F);
  const c = 1 / Math.sqrt(cos * cos + b2 * sin * sin);
  const s = b2 * c;
  const h = heightM / 1000 / WGS84_A_KM;
  return { rhoCosPhi: (c + h) * cos, rhoSinPhi: (s + h) * sin };
}

/** The observatory's parallax constants: as given, or computed from its geodetic latitude and height. */
export function observatoryParallax(o: Observatory): ParallaxConstants {
  if (o.rhoCosPhi !== null && o.rhoSinPhi !== null) return { rhoCosPhi: o.rhoCosPhi, rhoSinPhi: o.rhoSinPhi };
  if (o.geodeticLatitudeDeg !== null && o.heightM !== null) return parallaxFromGeodetic(o.geodeticLatitudeDeg, o.heightM);
  throw new RangeError(`observatory ${o.code}: needs the parallax constants or the geodetic latitude and height`);
}

/** Earth-fixed (ITRS) site vector, km: a (ρcosφ' cos λ, ρcosφ' sin λ, ρsinφ') with λ the east longitude. */
export function siteVectorItrsKm(o: Observatory): Vec3 {
  const { rhoCosPhi, rhoSinPhi } = observatoryParallax(o);
  const lam = o.longitudeDeg * DEG;
  return [WGS84_A_KM * rhoCosPhi * Math.cos(lam), WGS84_A_KM * rhoCosPhi * Math.sin(lam), WGS84_A_KM * rhoSinPhi];
}

/**
 * Geocentric latitude phi' (deg) and distance from the geocentre (km) of the site: for display and checks
 * (e.g. whether an object is above the horizon in the demo generator).
 */
export function geocentricLatitude(o: Observatory): { geocentricLatitudeDeg: number; distanceKm: number } {
  const { rhoCosPhi, rhoSinPhi } = observatoryParallax(o);
  return { geocentricLatitudeDeg: Math.atan2(rhoSinPhi, rhoCosPhi) / DEG, distanceKm: WGS84_A_KM * Math.hypot(rhoCosPhi, rhoSinPhi) };
}
