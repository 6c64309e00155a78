// Angular separation on the sky for the astrometry checks (Vincenty's formula for the sphere: well conditioned at
// every separation; common practice, no source).
const ARCSEC = Math.PI / (180 * 3600);

/** Angular separation (arcsec) of two RA/Dec pairs in radians. */
export function sepArcsec(ra1: number, dec1: number, ra2: number, dec2: number): number {
  const c = Math.sin(dec1) * Math.sin(dec2) + Math.cos(dec1) * Math.cos(dec2) * Math.cos(ra1 - ra2);
  const s = Math.hypot(Math.cos(dec2) * Math.sin(ra1 - ra2), Math.cos(dec1) * Math.sin(dec2) - Math.sin(dec1) * Math.cos(dec2) * Math.cos(ra1 - ra2));
  return Math.atan2(s, c) / ARCSEC;
}
