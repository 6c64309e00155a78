/**
 * Heliocentric ICRF observer states for ground-based observations (METHODS.md §9.4):
 *   r_obs = r_Earth(t) + r_site,GCRS(t),  v_obs = v_Earth(t) + v_site,GCRS(t)
 * with the geocentre from the planetary ephemeris (heliocentric ICRF, AU, AU/d; server/engine/ephemeris) and the
 * site vector of observatory.ts rotated by earthOrientation.ts. GCRS and ICRF axes are the same (no frame rotation
 * beyond the neglected ~23 mas frame bias, see earthOrientation.ts); the relativistic GCRS->BCRS scaling of the
 * 6378 km site vector (~1e-8 relative, sub-millimetre) is neglected.
 */
import type { Observatory } from '../../../shared/schemas/od';
import { AU_KM, DAY_S } from '../constants';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import type { PlanetEphemeris } from '../dynamics/types';
import { EARTH_INDEX } from '../ephemeris/bodies';
import type { Vec3 } from '../vec';
import { earthOrientationAt, siteGcrsKm, ut1DaysFromTdbDays } from './earthOrientation';
import { siteVectorItrsKm } from './observatory';

/** An observation names an observatory code that is not in the office's table. */
export class UnknownObservatoryError extends Error {
  readonly codes: string[];
  constructor(codes: string[]) {
    const list = [...new Set(codes)].sort();
    super(`Unknown observatory code${list.length === 1 ? '' : 's'}: ${list.join(', ')} (add ${list.length === 1 ? 'it' : 'them'} to the observatory table first)`);
    this.name = 'UnknownObservatoryError';
    this.codes = list;
  }
}

export type ObserverState = { positionAu: Vec3; velocityAuD: Vec3 };

export type ObserverOptions = {
  /**
   * UT1 − UTC in seconds for the Earth rotation angle (fit setting ut1MinusUtcSeconds; METHODS.md §9.4). Default 0:
   * UT1 taken as UTC, exactly the orientation of earthOrientationAt(tdbDays).
   */
  ut1MinusUtcSeconds?: number;
};

/** Checks an ObserverOptions value and returns UT1 − UTC in seconds (0 when not given). */
function ut1MinusUtcSecondsOf(options: ObserverOptions | undefined): number {
  const d = options?.ut1MinusUtcSeconds ?? 0;
  if (!Number.isFinite(d) || Math.abs(d) > 0.9) throw new RangeError(`ut1MinusUtcSeconds must be a finite number in [-0.9, 0.9] s, got ${d}`);
  return d;
}

/**
 * Geocentric site position (AU) and velocity (AU/d) in the GCRS of observatory `o` at a TDB instant. With
 * `ut1MinusUtcSeconds` = d ≠ 0, UT1 = UTC + d (the UTC of `tdbDays` from ut1DaysFromTdbDays plus d / 86400 days).
 */
export function siteGeocentricAu(o: Observatory, tdbDays: number, options?: ObserverOptions): ObserverState {
  const d = ut1MinusUtcSecondsOf(options);
  const eo = d === 0 ? earthOrientationAt(tdbDays) : earthOrientationAt(tdbDays, ut1DaysFromTdbDays(tdbDays) + d / DAY_S);
  const { positionKm, velocityKmS } = siteGcrsKm(siteVectorItrsKm(o), eo);
  return {
    positionAu: [positionKm[0] / AU_KM, positionKm[1] / AU_KM, positionKm[2] / AU_KM],
    velocityAuD: [(velocityKmS[0] * DAY_S) / AU_KM, (velocityKmS[1] * DAY_S) / AU_KM, (velocityKmS[2] * DAY_S) / AU_KM],
  };
}

/**
 * Heliocentric ICRF observer position (AU) and velocity (AU/d) for each item, in input order. Throws
 * UnknownObservatoryError (listing every missing code) before any computation when a code is not in the table.
 * Without `ephemeris`, a Chebyshev cache over the items' span is built. `options.ut1MinusUtcSeconds` (default 0 = UT1
 * taken as UTC, results unchanged) is one UT1 − UTC for all items.
 */
export function observerStatesAu(
  items: readonly { stn: string; obsTimeTdbDays: number }[],
  observatories: readonly Observatory[],
  ephemeris?: PlanetEphemeris,
  options?: ObserverOptions,
): ObserverState[] {
  const table = new Map(observatories.map((o) => [o.code, o]));
  const missing = items.filter((it) => !table.has(it.stn)).map((it) => it.stn);
  if (missing.length > 0) throw new UnknownObservatoryError(missing);
  const ut1Options: ObserverOptions = { ut1MinusUtcSeconds: ut1MinusUtcSecondsOf(options) };
  if (items.length === 0) return [];
  items.forEach((it, i) => {
    if (!Number.isFinite(it.obsTimeTdbDays)) throw new RangeError(`item ${i} (${it.stn}): obsTimeTdbDays must be finite, got ${it.obsTimeTdbDays}`);
  });
  let eph = ephemeris;
  if (!eph) {
    const times = items.map((it) => it.obsTimeTdbDays);
    eph = defaultEphemeris(times.reduce((a, t) => Math.min(a, t), Infinity), times.reduce((a, t) => Math.max(a, t), -Infinity) + 1e-3);
  }
  const earth = new Float64Array(6);
  return items.map((it) => {
    eph.stateInto(EARTH_INDEX, it.obsTimeTdbDays, earth);
    const site = siteGeocentricAu(table.get(it.stn)!, it.obsTimeTdbDays, ut1Options);
    return {
      positionAu: [earth[0] + site.positionAu[0], earth[1] + site.positionAu[1], earth[2] + site.positionAu[2]],
      velocityAuD: [earth[3] + site.velocityAuD[0], earth[4] + site.velocityAuD[1], earth[5] + site.velocityAuD[2]],
    };
  });
}
