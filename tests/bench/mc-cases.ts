/**
 * Benchmark cases for the Monte Carlo benchmarks (invented orbits, not real objects; built with the test helper neaCase):
 *  - 'deep': a ~ 1.5 AU, e ~ 0.4, i ~ 10 deg, passing ~20,000 km from the Earth's centre 5 years + 37 days after the
 *    start; clones from a 100 km / 0.01 m/s isotropic covariance, so some clones hit (deep-encounter case);
 *  - 'nea': a typical near-Earth orbit (a ~ 1.1 AU, e ~ 0.2, i ~ 5 deg) whose closest approach in the window is
 *    ~0.03 AU (4.5 million km): the clones cross the 0.05 AU approach threshold but nobody comes close.
 * Earth and Moon monitored, approach threshold 0.05 AU.
 */
import type { OrbitSolution } from '../../server/engine/assess/types';
import { AU_KM, DAY_S } from '../../server/engine/constants';
import type { EphemerisBody } from '../../server/engine/ephemeris';
import type { PlanetEphemeris } from '../../server/engine/dynamics/types';
import { neaCase } from '../unit/engine-mc-cases';

export function benchCase(kind: 'deep' | 'nea', eph: PlanetEphemeris, T0: number, years: number): { solution: OrbitSolution; bodies: EphemerisBody[] } {
  // 5 years + 37 days after the start, as in the earlier benchmark (same deep case), or 30 days before the end.
  const enc = T0 + Math.min(5 * 365.25 + 37, years * 365.25 - 30);
  const c =
    kind === 'deep'
      ? neaCase(eph, { startTdbDays: T0, encounterTdbDays: enc, missKm: 20_000, a: 1.5, e: 0.4, incDeg: 10 })
      : neaCase(eph, { startTdbDays: T0, encounterTdbDays: enc, missKm: 0.03 * AU_KM, a: 1.1, e: 0.2, incDeg: 5 });
  const sr = 100 / AU_KM, sv = (1e-8 * DAY_S) / AU_KM;
  const solution = {
    designation: kind === 'deep' ? 'BENCH-DEEP' : 'BENCH-NEA',
    name: null,
    epochTdbDays: T0,
    epochTdbJd: T0 + 2451545,
    positionAu: c.positionAu,
    velocityAuD: c.velocityAuD,
    covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'], matrix: [0, 1, 2, 3, 4, 5].map((i) => [0, 1, 2, 3, 4, 5].map((j) => (i === j ? (i < 3 ? sr * sr : sv * sv) : 0))) },
    nonGrav: null,
    hMagnitude: null,
    albedo: null,
    kind: 'unknown',
    notes: [],
    source: { format: 'tocsin-json', inputSha256: '0'.repeat(64), epochText: 'bench', timeScale: 'TDB' },
  } as OrbitSolution;
  return { solution, bodies: ['earth', 'moon'] };
}
