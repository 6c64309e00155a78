/**
 * Synthetic encounters for the assess tests (not a test file itself).
 *
 * Construction (independent of the assess code): take the Earth's heliocentric state at the encounter epoch from the
 * ephemeris, put an asteroid on a straight approach line with relative speed vRel and an offset (xi, zeta) in the
 * Öpik frame of that line (METHODS.md §5.2: xi^ = (v_E x S)/|v_E x S|, zeta^ = xi^ x S, S = incoming direction),
 * start it `leadDays` before the encounter, and integrate it back with the full dynamics to the solution epoch.
 * Earth's attraction bends the path slightly, so the actual b-plane point differs a little from the requested
 * offset; tests read the nominal b-plane point from the propagation and use the offset only to aim.
 */
import { AU_KM, DAY_S, KMS_TO_AUD } from '../../server/engine/constants';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import { propagate } from '../../server/engine/dynamics';
import type { OrbitSolution } from '../../server/engine/assess/types';
import type { Vec3 } from '../../server/engine/vec';

export const ENCOUNTER_TDB_DAYS = 11000; // 2030-02-12
const norm = (a: number[]) => Math.hypot(a[0], a[1], a[2]);
const cross = (a: number[], b: number[]): Vec3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const unit = (a: number[]): Vec3 => { const n = norm(a); return [a[0] / n, a[1] / n, a[2] / n]; };

let shared: ChebyshevEphemeris | null = null;
export function fixtureEphemeris(): ChebyshevEphemeris {
  shared ??= ChebyshevEphemeris.build(ENCOUNTER_TDB_DAYS - 400, ENCOUNTER_TDB_DAYS + 400);
  return shared;
}

export type SyntheticOptions = {
  xiKm: number;
  zetaKm: number;
  vRelKmS?: number;
  /** days between the solution epoch and the encounter */
  epochDaysBefore?: number;
  /** 1-sigma position (AU, isotropic), velocity (AU/d, isotropic) and extra along-track velocity (AU/d) */
  sigmaPositionAu?: number;
  sigmaVelocityAuD?: number;
  sigmaAlongTrackAuD?: number;
  designation?: string;
};

export function syntheticSolution(o: SyntheticOptions): { solution: OrbitSolution; ephemeris: ChebyshevEphemeris } {
  const eph = fixtureEphemeris();
  const earth = new Float64Array(6);
  const tEnc = ENCOUNTER_TDB_DAYS;
  const lead = 3; // days before the encounter where the straight line starts
  eph.stateInto(2, tEnc, earth);
  const rE = [earth[0], earth[1], earth[2]], vE = [earth[3], earth[4], earth[5]];
  const vRel = (o.vRelKmS ?? 10) * KMS_TO_AUD;
  // relative-velocity direction: a mix of anti-radial, along-track and normal (not parallel to v_E)
  const rh = unit(rE), nh = unit(cross(rE, vE)), th = cross(nh, rh);
  const S = unit([-0.5 * rh[0] + 0.3 * th[0] + 0.8 * nh[0], -0.5 * rh[1] + 0.3 * th[1] + 0.8 * nh[1], -0.5 * rh[2] + 0.3 * th[2] + 0.8 * nh[2]]);
  const xiHat = unit(cross(vE, S));
  const zetaHat = cross(xiHat, S);
  const off = [0, 1, 2].map((i) => (o.xiKm * xiHat[i] + o.zetaKm * zetaHat[i]) / AU_KM);
  // state at tEnc - lead: Earth's state then (ephemeris) plus the straight-line relative motion
  const e0 = new Float64Array(6);
  eph.stateInto(2, tEnc - lead, e0);
  const v = [0, 1, 2].map((i) => e0[3 + i] + vRel * S[i]) as Vec3;
  const r = [0, 1, 2].map((i) => e0[i] + off[i] - vRel * S[i] * lead) as Vec3;
  const epoch = tEnc - (o.epochDaysBefore ?? 100);
  const back = propagate({ positionAu: r, velocityAuD: v, fromTdbDays: tEnc - lead, toTdbDays: epoch, model: 'n-body', ephemeris: eph, impactBodies: [] });
  const r0 = back.positionAu, v0 = back.velocityAuD;
  // covariance: isotropic position and velocity, plus along-track velocity (direction of v0)
  const sp = o.sigmaPositionAu ?? 2e-8, sv = o.sigmaVelocityAuD ?? 2e-10, st = o.sigmaAlongTrackAuD ?? 0;
  const tv = unit(v0);
  const m = Array.from({ length: 6 }, (_, i) => Array.from({ length: 6 }, (_, j) => {
    if (i < 3 && j < 3) return i === j ? sp * sp : 0;
    if (i >= 3 && j >= 3) return (i === j ? sv * sv : 0) + st * st * tv[i - 3] * tv[j - 3];
    return 0;
  }));
  const solution: OrbitSolution = {
    designation: o.designation ?? 'SYN-1',
    name: null,
    epochTdbDays: epoch,
    epochTdbJd: epoch + 2451545,
    positionAu: r0,
    velocityAuD: v0,
    covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'], matrix: m },
    nonGrav: null,
    hMagnitude: 22,
    albedo: null,
    kind: 'asteroid',
    notes: [],
    source: { format: 'tocsin-json', inputSha256: '0'.repeat(64), epochText: `JD:${epoch + 2451545}`, timeScale: 'TDB' },
  };
  return { solution, ephemeris: eph };
}

export { DAY_S };
