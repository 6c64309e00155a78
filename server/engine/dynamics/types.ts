/**
 * Public types of the dynamics module (names fixed by the engine contract).
 * Units: AU, AU/d, days of TDB since J2000.0 (`tdbDays`), heliocentric ICRF equatorial.
 */

import type { EphemerisBody } from '../ephemeris';
import type { Vec3 } from '../vec';

export type { Vec3 };

/** Marsden–Sekanina–Yeomans non-gravitational parameters A1, A2, A3 in AU/d^2 (METHODS.md §4.3). */
export type NonGravParams = {
  a1: number;
  a2: number;
  a3: number;
  /** 'water-ice': MSY 1973 g(r); 'inverse-square': g(r) = (1 AU / r)^2 (asteroids, Yarkovsky-type A2). */
  law: 'water-ice' | 'inverse-square';
};

/** 'n-body': Sun + Mercury..Neptune + Earth and Moon separately + Sun 1PN GR (+ non-grav). 'two-body': Sun point mass only. */
export type DynamicsModel = 'n-body' | 'two-body';

/** Called after every accepted integration step (forward or backward in time). */
export type StepInfo = {
  /** Step start, tdbDays. */
  t0: number;
  /** Step end, tdbDays (t1 < t0 when integrating backward). */
  t1: number;
  /** Dense output inside [t0, t1]: writes x, y, z (AU), vx, vy, vz (AU/d) into out[0..5]. */
  stateAt(tdbDays: number, out: Float64Array): void;
};

/**
 * What dynamics needs from an ephemeris: EPH's ChebyshevEphemeris satisfies this structurally
 * (see server/engine/ephemeris). Bodies in the order of EPHEMERIS_BODIES:
 * mercury, venus, earth, moon, mars, jupiter, saturn, uranus, neptune.
 */
export interface PlanetEphemeris {
  readonly startTdbDays: number;
  readonly endTdbDays: number;
  /** 27 values: heliocentric ICRF positions (AU) of the nine bodies, out[3*i+k]. */
  positionsInto(tdbDays: number, out: Float64Array): void;
  /** 6 values: heliocentric ICRF position (AU) and velocity (AU/d) of body `bodyIndex`. */
  stateInto(bodyIndex: number, tdbDays: number, out: Float64Array): void;
}

export { EPHEMERIS_BODIES as DYNAMICS_BODIES, bodyIndex } from '../ephemeris';
export type DynamicsBody = EphemerisBody;

/**
 * A force model evaluates accelerations for N independent test particles at one time, sharing one
 * ephemeris evaluation. State arrays are Float64Array of length 3N (x0,y0,z0,x1,...).
 */
export interface ForceModel {
  /** Number of acceleration evaluations of one particle set so far. */
  evaluations: number;
  accelerations(tdbDays: number, x: Float64Array, v: Float64Array, out: Float64Array): void;
  /**
   * Largest |step| in days allowed from this state (encounter step cap, METHODS.md §4.4),
   * or Infinity when no cap applies.
   */
  maxStepDays(tdbDays: number, x: Float64Array, v: Float64Array): number;
}
