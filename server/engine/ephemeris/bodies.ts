/** The bodies the ephemeris provides (the Sun is the origin: positions are heliocentric). Order is fixed by the engine contract. */
export type EphemerisBody =
  | 'mercury'
  | 'venus'
  | 'earth'
  | 'moon'
  | 'mars'
  | 'jupiter'
  | 'saturn'
  | 'uranus'
  | 'neptune';

export const EPHEMERIS_BODIES: readonly EphemerisBody[] = Object.freeze([
  'mercury',
  'venus',
  'earth',
  'moon',
  'mars',
  'jupiter',
  'saturn',
  'uranus',
  'neptune',
] as const);

export const EARTH_INDEX = 2;
export const MOON_INDEX = 3;

export function bodyIndex(body: EphemerisBody): number {
  const i = EPHEMERIS_BODIES.indexOf(body);
  if (i < 0) throw new RangeError(`unknown ephemeris body "${String(body)}"; expected one of ${EPHEMERIS_BODIES.join(', ')}`);
  return i;
}
