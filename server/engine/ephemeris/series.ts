/**
 * Reference ("slow") ephemeris straight from the analytic series: heliocentric ICRF equatorial positions and
 * velocities, AU and AU/day, argument TDB days since J2000.0. About 0.1–0.3 ms per body.
 * - Planets and the Earth itself: full VSOP87B (vsop87.ts) with the frame tie (frame-tie.ts).
 * - Moon: heliocentric Earth (as above) + geocentric Moon from ELP/MPP02 (DE405 fit, elpmpp02.ts) with its tie.
 * The Sun is the origin.
 */
import type { Vec3 } from '../vec';
import { AU_KM } from '../constants';
import type { EphemerisBody } from './bodies';
import { vsop87PositionInto, vsop87StateInto } from './vsop87';
import { elpMoonGeocentricKmInto } from './elpmpp02';
import { applyTieInPlace, ELP_ECLIPTIC_TO_EQUATORIAL, FRAME_TIE_FIT, VSOP87_TO_FK5 } from './frame-tie';

/** Geocentric Moon, ICRF equatorial, AU and AU/day, into `out` (6 values). */
export function moonGeocentricStateInto(tdbDays: number, out: Float64Array | number[], withVelocity = true): void {
  elpMoonGeocentricKmInto(tdbDays, out, withVelocity);
  for (let k = 0; k < 6; k++) out[k] /= AU_KM;
  applyTieInPlace(out, ELP_ECLIPTIC_TO_EQUATORIAL, FRAME_TIE_FIT.moon, tdbDays);
}

const moonScratch = new Float64Array(6);

/** Heliocentric ICRF state of `body` into `out` (6 values: AU, AU/day). */
export function seriesStateInto(body: EphemerisBody, tdbDays: number, out: Float64Array | number[]): void {
  if (!Number.isFinite(tdbDays)) throw new RangeError(`tdbDays must be finite, got ${tdbDays}`);
  if (body === 'moon') {
    vsop87StateInto('earth', tdbDays, out);
    applyTieInPlace(out, VSOP87_TO_FK5, FRAME_TIE_FIT.earth, tdbDays);
    moonGeocentricStateInto(tdbDays, moonScratch);
    for (let k = 0; k < 6; k++) out[k] += moonScratch[k];
    return;
  }
  vsop87StateInto(body, tdbDays, out);
  applyTieInPlace(out, VSOP87_TO_FK5, FRAME_TIE_FIT[body], tdbDays);
}

/**
 * Heliocentric ICRF position only (AU) into out[0..2] (out needs 6 slots; out[3..5] are scratch).
 * Half the cost of seriesStateInto; used to build the Chebyshev cache. Not for the Moon (use the geocentric one).
 */
export function seriesPositionInto(body: Exclude<EphemerisBody, 'moon'>, tdbDays: number, out: Float64Array | number[]): void {
  vsop87PositionInto(body, tdbDays, out);
  out[3] = 0;
  out[4] = 0;
  out[5] = 0;
  applyTieInPlace(out, VSOP87_TO_FK5, FRAME_TIE_FIT[body], tdbDays);
}

/** Heliocentric ICRF position (AU) and velocity (AU/day) of `body` from the full series. */
export function seriesState(body: EphemerisBody, tdbDays: number): { positionAu: Vec3; velocityAuD: Vec3 } {
  const s = new Float64Array(6);
  seriesStateInto(body, tdbDays, s);
  return { positionAu: [s[0], s[1], s[2]], velocityAuD: [s[3], s[4], s[5]] };
}
