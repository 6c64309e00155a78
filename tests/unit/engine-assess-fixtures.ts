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
import { linearAssessment } from '../../server/engine/assess/linear';
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

/** End of the assessment window used with these fixtures: 30 days past the encounter. */
export const FIXTURE_UNTIL_TDB_DAYS = ENCOUNTER_TDB_DAYS + 30;

/** The context linear.ts and lov.ts take, for a fixture solution (Earth only, 0.05 au). */
export function assessContext(s: OrbitSolution) {
  return {
    nominal: { epochTdbDays: s.epochTdbDays, positionAu: s.positionAu, velocityAuD: s.velocityAuD, nonGrav: s.nonGrav },
    covariance: { names: s.covariance!.parameters, n: s.covariance!.parameters.length, matrix: Float64Array.from(s.covariance!.matrix.flat()) },
    ephemeris: fixtureEphemeris(),
    untilTdbDays: FIXTURE_UNTIL_TDB_DAYS,
    bodies: ['earth' as const],
    maxAu: 0.05,
  };
}

/** A fixture solution aimed at (xi, zeta) and its linear results (one per approach). */
export function linearAimedAt(xiKm: number, zetaKm: number, sigmaAlongTrackAuD = 0) {
  const { solution } = syntheticSolution({ xiKm, zetaKm, sigmaAlongTrackAuD });
  return { solution, results: linearAssessment(assessContext(solution)) };
}

/**
 * Elongated uncertainty (along-track velocity sigma 1.3e-6 AU/d), the trace aimed to cross the b-plane
 * `alongSigmas` major-axis sigmas from the centre, with a cross-trace offset of `crossOfCapture` capture radii plus
 * `crossSigmas` minor-axis sigmas (three aiming corrections from the linear b-plane point).
 */
export function aimedAlongTrace(alongSigmas: number, crossOfCapture: number, crossSigmas = 0) {
  let tx = 3000, tz = 20000;
  const at = (x: number, z: number) => {
    const { solution, results } = linearAimedAt(x, z, 1.3e-6);
    return { solution, lin: results[0] };
  };
  let r = at(tx, tz);
  for (let it = 0; it < 3; it++) {
    const lin = r.lin;
    const g = lin.bPlaneCovarianceKm2!;
    const ang = 0.5 * Math.atan2(2 * g[0][1], g[0][0] - g[1][1]);
    const w = [Math.cos(ang), Math.sin(ang)], n = [-w[1], w[0]];
    const [mx, mz] = [lin.approach.bPlane!.xiKm, lin.approach.bPlane!.zetaKm];
    const along = mx * w[0] + mz * w[1], across = mx * n[0] + mz * n[1];
    const wantAlong = alongSigmas * lin.ip!.sigmaMajorKm;
    const wantCross = crossOfCapture * lin.captureRadiusKm! + crossSigmas * lin.ip!.sigmaMinorKm;
    tx += (wantAlong - along) * w[0] + (wantCross - across) * n[0];
    tz += (wantAlong - along) * w[1] + (wantCross - across) * n[1];
    r = at(tx, tz);
  }
  return r;
}
