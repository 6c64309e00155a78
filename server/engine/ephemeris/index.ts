/** Planet and Moon ephemeris: heliocentric ICRF equatorial, AU and AU/day, argument TDB days since J2000.0. */
export { EPHEMERIS_BODIES, bodyIndex } from './bodies';
export type { EphemerisBody } from './bodies';
export { seriesState, seriesStateInto, moonGeocentricStateInto } from './series';
export { ChebyshevEphemeris, GRANULES } from './chebyshev';
export { FRAME_TIE_FIT, FRAME_TIE_DESCRIPTION } from './frame-tie';
