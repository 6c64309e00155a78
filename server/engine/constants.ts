/**
 * Physical constants used by the engine. Every value names its source (handbook METHODS.md §10).
 * Internal units: AU, day (86400 s TDB), AU^3/d^2 for GM, radians.
 */

/** Astronomical unit in km, exact (IAU 2012 Resolution B2). */
export const AU_KM = 149_597_870.7;
/** Seconds per day of TDB. */
export const DAY_S = 86_400;
/** Speed of light, km/s, exact (SI). */
export const C_KM_S = 299_792.458;
/** Speed of light in AU/d (computed from the two above). */
export const C_AU_D = (C_KM_S * DAY_S) / AU_KM;
/** Julian date of J2000.0 (TT/TDB). */
export const J2000_JD = 2_451_545.0;
/** km/s to AU/d. */
export const KMS_TO_AUD = DAY_S / AU_KM;

/** GM values in km^3/s^2, DE440 (Park et al. 2021; NAIF gm_de440). Planet values are system GMs except Earth and Moon. */
export const GM_KM3_S2 = {
  sun: 1.3271244004127942e11,
  mercury: 2.2031868551400003e4,
  venus: 3.24858592e5,
  earth: 3.9860043550702266e5,
  moon: 4.9028001184575496e3,
  mars: 4.2828375815756102e4,
  jupiter: 1.2671276409999998e8,
  saturn: 3.7940584841799997e7,
  uranus: 5.7945563999999985e6,
  neptune: 6.8365271005803989e6,
  pluto: 9.755e2,
} as const;

export type GmBody = keyof typeof GM_KM3_S2;

/** km^3/s^2 to AU^3/d^2. */
export const GM_KM3S2_TO_AU3D2 = (DAY_S * DAY_S) / (AU_KM * AU_KM * AU_KM);

/** GM values in AU^3/d^2 (computed from GM_KM3_S2). GM_sun = 2.9591220828411956e-4 (METHODS.md §10). */
export const GM_AU3_D2: Record<GmBody, number> = Object.fromEntries(
  Object.entries(GM_KM3_S2).map(([k, v]) => [k, v * GM_KM3S2_TO_AU3D2]),
) as Record<GmBody, number>;

/** Earth/Moon mass ratio (computed from the DE440 GMs). */
export const EARTH_MOON_MASS_RATIO = GM_KM3_S2.earth / GM_KM3_S2.moon;

/** Body radii in km used for impact detection. Earth: WGS84 / GRS80 equatorial radius (METHODS.md §10). */
export const RADIUS_KM = {
  earth: 6378.137,
  /** IAU 2015 nominal mean radii, recalled from memory [M]. */
  moon: 1737.4,
  venus: 6051.8,
  mars: 3396.19,
} as const;

/** Obliquity of the J2000 ecliptic used for element input/output: IAU 1976 value 84381.448" (Lieske et al. 1977). */
export const OBLIQUITY_J2000_IAU1976_RAD = (84381.448 / 3600) * (Math.PI / 180);
/** IAU 2006 obliquity 84381.406" (Capitaine et al. 2003), the frame swetest uses for its J2000 ecliptic. */
export const OBLIQUITY_J2000_IAU2006_RAD = (84381.406 / 3600) * (Math.PI / 180);

/** Marsden–Sekanina–Yeomans (1973) water-ice g(r) constants. */
export const MSY_WATER_ICE = { alpha: 0.1112620426, r0Au: 2.808, m: 2.15, n: 5.093, k: 4.6142 } as const;

/** 1 Mt TNT in joules (convention; NIST SP 811). */
export const MEGATON_TNT_J = 4.184e15;
