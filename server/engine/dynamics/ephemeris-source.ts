/** Default ephemeris for a run: EPH's Chebyshev cache over the span, padded by one day each side. */
import { ChebyshevEphemeris } from '../ephemeris';
import type { PlanetEphemeris } from './types';

export const EPHEMERIS_PAD_DAYS = 1;

export function defaultEphemeris(fromTdbDays: number, toTdbDays: number): PlanetEphemeris {
  return ChebyshevEphemeris.build(
    Math.min(fromTdbDays, toTdbDays) - EPHEMERIS_PAD_DAYS,
    Math.max(fromTdbDays, toTdbDays) + EPHEMERIS_PAD_DAYS,
  );
}
