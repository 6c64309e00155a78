// Synthetic astrometry of one invented test orbit, shared by the orbit-determination unit tests, the CLI test and
// the benchmark: the orbit (q 0.95 au, e 0.3, i 10°, perihelion 40 days before T0; invented), an even grid of
// nights, and the arc itself through the engine's synthesizeAdesPsv (observer.ts + predict.ts, n-body with light
// time, seeded noise), the stations alternating over the given observatories.
import type { Observatory } from '../../shared/schemas/od';
import { GM_AU3_D2 } from '../../server/engine/constants';
import { eclipticToEquatorial } from '../../server/engine/frames';
import { synthesizeAdesPsv } from '../../server/engine/od/synthetic';
import { utcFromTdbDays } from '../../server/engine/time';
import { elementsToState } from '../../server/engine/twobody';
import type { Vec3 } from '../../server/engine/vec';

const DEG = Math.PI / 180;
/** Epoch of the test orbit: 2029-12-24 0h TDB (days from J2000.0). */
export const TEST_T0 = 10950.5;

export type TestOrbit = {
  epochTdbDays: number;
  positionAu: Vec3;
  velocityAuD: Vec3;
  nonGrav: { a1: number; a2: number; a3: number; law: 'water-ice' | 'inverse-square' } | null;
};

/** The invented test orbit at TEST_T0 (equatorial J2000 state), with the given non-gravitational terms. */
export function testOrbit(nonGrav: TestOrbit['nonGrav'] = null): TestOrbit {
  const s = elementsToState({ q: 0.95, e: 0.3, i: 10 * DEG, node: 80 * DEG, argPeri: 200 * DEG, tp: TEST_T0 - 40, epoch: TEST_T0 }, GM_AU3_D2.sun);
  return { epochTdbDays: TEST_T0, positionAu: eclipticToEquatorial(s.r), velocityAuD: eclipticToEquatorial(s.v), nonGrav };
}

/** nights x perNight observations, 20 min apart, evenly spread over `spanDays` centred on TEST_T0. */
export function nightTimes(nights: number, perNight: number, spanDays: number): number[] {
  const out: number[] = [];
  for (let n = 0; n < nights; n++) for (let k = 0; k < perNight; k++) out.push(TEST_T0 - spanDays / 2 + (n * spanDays) / (nights - 1) + 0.3 + k * 0.014);
  return out;
}

/** ADES PSV text of `orbit` observed at `timesTdbDays`, the stations taking turns in the order given. */
export function syntheticPsv(opts: {
  designation: string;
  orbit: TestOrbit;
  observatories: Observatory[];
  timesTdbDays: number[];
  noiseArcsec: number;
  seed: number;
  outliers?: { index: number; offsetArcsec: number }[];
}): string {
  const { observatories } = opts;
  return synthesizeAdesPsv({
    designation: opts.designation,
    orbit: opts.orbit,
    observatories,
    nights: opts.timesTdbDays.map((t, i) => ({ stn: observatories[i % observatories.length].code, utc: utcFromTdbDays(t).utc })),
    noiseArcsec: opts.noiseArcsec,
    seed: opts.seed,
    outliers: opts.outliers,
  }).psv;
}
