/**
 * Close approaches (METHODS.md §5.1): along one propagation, monitor f(t) = rho . rhodot for each requested
 * body (rho = r - r_P, rhodot = v - v_P; geometric, planet CENTRES, not barycentres). A sign change of f from
 * - to + (in increasing time) inside a step, with |rho| below maxAu at the root, is a minimum of distance; its
 * time is refined with Brent's method on the integrator's dense output to 1e-6 d (0.09 s). Each step is
 * sampled at several points when the body is near, so several minima in one step (Earth and Moon, slow
 * encounters) are all found; minima at the ends of the window are reported with `windowEdge: true`.
 *
 * Impacts: propagate() stops when the trajectory reaches the surface of Earth, Moon, Venus or Mars
 * (constants.ts RADIUS_KM). The approach is then reported with impact = true, tdbDays = impactTdbDays =
 * the surface-crossing time, distanceKm = the body's radius; the integration never goes through the centre.
 *
 * b-plane: (xi, zeta) in the Öpik frame with zeta opposite the projection of the planet's heliocentric velocity
 * (Valsecchi et al. 2003; see bplane.ts), computed from the planet-centred state at closest approach (or at
 * the surface crossing). Null when the planet-centred orbit is not hyperbolic (temporary capture); so is
 * vInfinityKmS.
 */
import { AU_KM, DAY_S, GM_KM3_S2 } from '../constants';
import { brentRoot } from './brent';
import { bPlaneFromState } from './bplane';
import { defaultEphemeris } from './ephemeris-source';
import { propagate } from './propagate';
import {
  bodyIndex,
  type DynamicsBody,
  type DynamicsModel,
  type NonGravParams,
  type PlanetEphemeris,
  type StepInfo,
  type Vec3,
} from './types';

export type CloseApproach = {
  body: DynamicsBody;
  /** Time of closest approach (or of the surface crossing for an impact), TDB days since J2000.0. */
  tdbDays: number;
  distanceKm: number;
  relativeSpeedKmS: number;
  /** Planet-centred hyperbolic excess speed; null if the planet-centred orbit is bound. */
  vInfinityKmS: number | null;
  /** Öpik b-plane coordinates; null if the planet-centred orbit is bound. */
  bPlane: { xiKm: number; zetaKm: number } | null;
  impact: boolean;
  /** Surface-crossing time when impact is true, else null. */
  impactTdbDays: number | null;
  /** True when the minimum is at the start or end of the window (distance still falling/rising there). */
  windowEdge: boolean;
  /** Planet-centred state at tdbDays (km, km/s) and the planet's heliocentric velocity (km/s). */
  relPositionKm: Vec3;
  relVelocityKmS: Vec3;
  planetVelocityKmS: Vec3;
};

export type FindCloseApproachesOptions = {
  positionAu: Vec3;
  velocityAuD: Vec3;
  fromTdbDays: number;
  untilTdbDays: number;
  /** Default ['earth']. */
  bodies?: DynamicsBody[];
  /** Report minima below this distance (default 0.05 AU). */
  maxAu?: number;
  model?: DynamicsModel;
  ephemeris?: PlanetEphemeris;
  nonGrav?: NonGravParams | null;
  tolerance?: number;
  relativity?: boolean;
};

const AUD_TO_KMS = AU_KM / DAY_S;
/** Time tolerance of the minimum search: 1e-6 d = 0.0864 s. */
const T_TOL_DAYS = 1e-6;

export function findCloseApproaches(opts: FindCloseApproachesOptions): CloseApproach[] {
  const bodies = opts.bodies ?? ['earth'];
  const maxAu = opts.maxAu ?? 0.05;
  const model = opts.model ?? 'n-body';
  const from = opts.fromTdbDays, until = opts.untilTdbDays;
  const eph = opts.ephemeris ?? defaultEphemeris(from, until);
  const dir = until >= from ? 1 : -1;
  const idx = bodies.map(bodyIndex);
  const ps = new Float64Array(6);
  const qs = new Float64Array(6);
  const found: CloseApproach[] = [];

  const relAt = (j: number, t: number, stateAt: (t: number, out: Float64Array) => void) => {
    stateAt(t, qs);
    eph.stateInto(idx[j], t, ps);
    const dx = qs[0] - ps[0], dy = qs[1] - ps[1], dz = qs[2] - ps[2];
    const du = qs[3] - ps[3], dv = qs[4] - ps[4], dw = qs[5] - ps[5];
    return { rho: Math.hypot(dx, dy, dz), f: dx * du + dy * dv + dz * dw };
  };

  const record = (body: DynamicsBody, j: number, t: number, stateAt: (t: number, out: Float64Array) => void, extra: { impact: boolean; windowEdge: boolean }) => {
    stateAt(t, qs);
    eph.stateInto(j, t, ps);
    const rel: Vec3 = [(qs[0] - ps[0]) * AU_KM, (qs[1] - ps[1]) * AU_KM, (qs[2] - ps[2]) * AU_KM];
    const relV: Vec3 = [(qs[3] - ps[3]) * AUD_TO_KMS, (qs[4] - ps[4]) * AUD_TO_KMS, (qs[5] - ps[5]) * AUD_TO_KMS];
    const vP: Vec3 = [ps[3] * AUD_TO_KMS, ps[4] * AUD_TO_KMS, ps[5] * AUD_TO_KMS];
    const mu = GM_KM3_S2[body];
    const bp = bPlaneFromState(rel, relV, mu, vP);
    found.push({
      body,
      tdbDays: t,
      distanceKm: Math.hypot(rel[0], rel[1], rel[2]),
      relativeSpeedKmS: Math.hypot(relV[0], relV[1], relV[2]),
      vInfinityKmS: bp ? bp.vInfinityKmS : null,
      bPlane: bp ? { xiKm: bp.xiKm, zetaKm: bp.zetaKm } : null,
      impact: extra.impact,
      impactTdbDays: extra.impact ? t : null,
      windowEdge: extra.windowEdge,
      relPositionKm: rel,
      relVelocityKmS: relV,
      planetVelocityKmS: vP,
    });
  };

  // Per body: f and rho at the previous sample (in integration order).
  const prevF = new Float64Array(bodies.length);
  const prevRho = new Float64Array(bodies.length);
  let first = true;
  let last: StepInfo | null = null;

  const onStep = (step: StepInfo) => {
    const { t0, t1, stateAt } = step;
    last = step;
    if (first) {
      first = false;
      for (let j = 0; j < bodies.length; j++) {
        const { rho, f } = relAt(j, t0, stateAt);
        prevF[j] = f;
        prevRho[j] = rho;
        // Minimum at the window start: distance increasing (in the integration direction) from the start.
        if (rho < maxAu && f * dir > 0) record(bodies[j], idx[j], t0, stateAt, { impact: false, windowEdge: true });
      }
    }
    for (let j = 0; j < bodies.length; j++) {
      // Sample more finely when the body is near (several minima in one step: Earth + Moon, slow encounters).
      const near = prevRho[j] < 4 * maxAu;
      const m = near ? 8 : 2;
      let ta = t0;
      for (let k = 1; k <= m; k++) {
        const tb = k === m ? t1 : t0 + ((t1 - t0) * k) / m;
        const { rho, f } = relAt(j, tb, stateAt);
        const fa = prevF[j];
        // Minimum in increasing time: f(earlier) < 0 < f(later).
        const fEarly = dir > 0 ? fa : f;
        const fLate = dir > 0 ? f : fa;
        if (fEarly < 0 && fLate > 0) {
          const tm = brentRoot((t) => relAt(j, t, stateAt).f, ta, tb, T_TOL_DAYS);
          if (relAt(j, tm, stateAt).rho < maxAu) record(bodies[j], idx[j], tm, stateAt, { impact: false, windowEdge: false });
        }
        prevF[j] = f;
        prevRho[j] = rho;
        ta = tb;
      }
    }
  };

  const res = propagate({
    positionAu: opts.positionAu,
    velocityAuD: opts.velocityAuD,
    fromTdbDays: from,
    toTdbDays: until,
    model,
    ephemeris: eph,
    nonGrav: opts.nonGrav,
    tolerance: opts.tolerance,
    relativity: opts.relativity,
    onStep,
  });

  const lastStep = last as StepInfo | null;
  if (res.impact && lastStep) {
    const j = bodyIndex(res.impact.body);
    record(res.impact.body, j, res.impact.tdbDays, lastStep.stateAt, { impact: true, windowEdge: false });
  } else if (lastStep) {
    // Minimum at the window end: distance still decreasing at the end.
    for (let j = 0; j < bodies.length; j++) {
      if (prevRho[j] < maxAu && prevF[j] * dir < 0) record(bodies[j], idx[j], lastStep.t1, lastStep.stateAt, { impact: false, windowEdge: true });
    }
  }
  found.sort((a, b) => (a.tdbDays - b.tdbDays) * dir);
  return found;
}
