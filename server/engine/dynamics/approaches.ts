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
import { propagate, type ImpactEvent } from './propagate';
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
/**
 * A step is scanned at its ends only when |v_rel| |dt| < STRAIGHT rho at its start: the relative path then turns
 * by less than ~STRAIGHT radians (less for a hyperbolic flyby), so there is at most one minimum in the step.
 */
const STRAIGHT = 0.05;

/**
 * Close-approach monitor for ONE trajectory, fed step by step (after every accepted integration step) with the
 * step's dense output. findCloseApproaches uses it for a single object; batch runs (server/engine/assess/batch.ts)
 * keep one per clone. Approaches found so far are in `found` (in the order found; sort by time when done).
 */
export class ApproachMonitor {
  readonly found: CloseApproach[] = [];
  private readonly idx: number[];
  private readonly ps = new Float64Array(6);
  private readonly qs = new Float64Array(6);
  /** Per body: f and rho at the previous sample (in integration order). */
  private readonly prevF: Float64Array;
  private readonly prevRho: Float64Array;
  /** Per body: relative speed at the previous sample (AU/d). */
  private readonly prevVrel: Float64Array;
  /** Per body: 1 when the previous step was skipped (prevF, prevRho unknown). */
  private readonly stale: Uint8Array;
  private first = true;
  private lastRho = 0;
  private lastF = 0;
  private lastVrel = 0;

  constructor(
    private readonly eph: PlanetEphemeris,
    private readonly bodies: DynamicsBody[],
    private readonly maxAu: number,
    /** +1 forward in time, -1 backward. */
    private readonly dir: number,
  ) {
    this.idx = bodies.map(bodyIndex);
    this.prevF = new Float64Array(bodies.length);
    this.prevRho = new Float64Array(bodies.length);
    this.stale = new Uint8Array(bodies.length);
    this.prevVrel = new Float64Array(bodies.length).fill(Infinity);
  }

  /** Sets lastRho, lastF for body j at t (no allocation). */
  private relAt(j: number, t: number, stateAt: (t: number, out: Float64Array) => void): void {
    const qs = this.qs, ps = this.ps;
    stateAt(t, qs);
    this.eph.stateInto(this.idx[j], t, ps);
    const dx = qs[0] - ps[0], dy = qs[1] - ps[1], dz = qs[2] - ps[2];
    const du = qs[3] - ps[3], dv = qs[4] - ps[4], dw = qs[5] - ps[5];
    this.lastRho = Math.sqrt(dx * dx + dy * dy + dz * dz);
    this.lastF = dx * du + dy * dv + dz * dw;
    this.lastVrel = Math.sqrt(du * du + dv * dv + dw * dw);
  }

  private fAt(j: number, t: number, stateAt: (t: number, out: Float64Array) => void): number {
    this.relAt(j, t, stateAt);
    return this.lastF;
  }

  /** Record the approach to body `body` at t from the dense output. */
  record(body: DynamicsBody, t: number, stateAt: (t: number, out: Float64Array) => void, extra: { impact: boolean; windowEdge: boolean }): void {
    const qs = this.qs, ps = this.ps;
    stateAt(t, qs);
    this.eph.stateInto(bodyIndex(body), t, ps);
    const rel: Vec3 = [(qs[0] - ps[0]) * AU_KM, (qs[1] - ps[1]) * AU_KM, (qs[2] - ps[2]) * AU_KM];
    const relV: Vec3 = [(qs[3] - ps[3]) * AUD_TO_KMS, (qs[4] - ps[4]) * AUD_TO_KMS, (qs[5] - ps[5]) * AUD_TO_KMS];
    const vP: Vec3 = [ps[3] * AUD_TO_KMS, ps[4] * AUD_TO_KMS, ps[5] * AUD_TO_KMS];
    const mu = GM_KM3_S2[body];
    const bp = bPlaneFromState(rel, relV, mu, vP);
    this.found.push({
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
  }

  /**
   * Scan one accepted step [t0, t1] (t1 may be truncated at an impact) using its dense output.
   * `skip` (optional, one flag per body, batches): the caller has shown that body j stays beyond 4 maxAu during
   * the whole step (so no minimum below maxAu can be in it), and that body is not sampled: its running state is
   * marked unknown and re-read from the dense output at the start of the next step that is scanned.
   */
  onStep(t0: number, t1: number, stateAt: (t: number, out: Float64Array) => void, skip?: Uint8Array): void {
    const { bodies, maxAu, dir, prevF, prevRho, prevVrel, stale } = this;
    if (this.first) {
      this.first = false;
      for (let j = 0; j < bodies.length; j++) {
        if (skip !== undefined && skip[j] === 1) continue;
        this.relAt(j, t0, stateAt);
        prevF[j] = this.lastF;
        prevRho[j] = this.lastRho;
        prevVrel[j] = this.lastVrel;
        stale[j] = 0;
        // Minimum at the window start: distance increasing (in the integration direction) from the start.
        if (this.lastRho < maxAu && this.lastF * dir > 0) this.record(bodies[j], t0, stateAt, { impact: false, windowEdge: true });
      }
    }
    for (let j = 0; j < bodies.length; j++) {
      if (skip !== undefined && skip[j] === 1) {
        stale[j] = 1;
        prevRho[j] = Infinity;
        prevF[j] = 0;
        continue;
      }
      if (stale[j] === 1) {
        this.relAt(j, t0, stateAt);
        prevF[j] = this.lastF;
        prevRho[j] = this.lastRho;
        prevVrel[j] = this.lastVrel;
        stale[j] = 0;
      }
      // Sample more finely when the body is near (several minima in one step: Earth + Moon, slow encounters),
      // except when the relative path is nearly straight over the step (relative motion < STRAIGHT x distance: at
      // most one minimum, so f changes sign at most once and the step's ends bracket it).
      const near = prevRho[j] < 4 * maxAu;
      const straight = prevVrel[j] * Math.abs(t1 - t0) < STRAIGHT * prevRho[j];
      const m = straight ? 1 : near ? 8 : 2;
      let ta = t0;
      for (let k = 1; k <= m; k++) {
        const tb = k === m ? t1 : t0 + ((t1 - t0) * k) / m;
        this.relAt(j, tb, stateAt);
        const rho = this.lastRho, f = this.lastF;
        const fa = prevF[j];
        // Minimum in increasing time: f(earlier) < 0 < f(later).
        const fEarly = dir > 0 ? fa : f;
        const fLate = dir > 0 ? f : fa;
        if (fEarly < 0 && fLate > 0) {
          const tm = brentRoot((t) => this.fAt(j, t, stateAt), ta, tb, T_TOL_DAYS);
          this.relAt(j, tm, stateAt);
          if (this.lastRho < maxAu) this.record(bodies[j], tm, stateAt, { impact: false, windowEdge: false });
        }
        prevF[j] = f;
        prevRho[j] = rho;
        prevVrel[j] = this.lastVrel;
        ta = tb;
      }
    }
  }

  /**
   * End of the trajectory: with an impact, record it (at the surface-crossing time, from the last step's dense
   * output); otherwise record minima still in progress at the window end (distance still decreasing).
   */
  finish(lastT1: number | null, stateAt: ((t: number, out: Float64Array) => void) | null, impact: ImpactEvent | null): void {
    if (!stateAt || lastT1 === null) return;
    if (impact) {
      this.record(impact.body, impact.tdbDays, stateAt, { impact: true, windowEdge: false });
      return;
    }
    for (let j = 0; j < this.bodies.length; j++) {
      if (this.prevRho[j] < this.maxAu && this.prevF[j] * this.dir < 0) this.record(this.bodies[j], lastT1, stateAt, { impact: false, windowEdge: true });
    }
  }
}

export function findCloseApproaches(opts: FindCloseApproachesOptions): CloseApproach[] {
  const bodies = opts.bodies ?? ['earth'];
  const maxAu = opts.maxAu ?? 0.05;
  const model = opts.model ?? 'n-body';
  const from = opts.fromTdbDays, until = opts.untilTdbDays;
  const eph = opts.ephemeris ?? defaultEphemeris(from, until);
  const dir = until >= from ? 1 : -1;
  const monitor = new ApproachMonitor(eph, bodies, maxAu, dir);
  let last: StepInfo | null = null;

  const onStep = (step: StepInfo) => {
    last = step;
    monitor.onStep(step.t0, step.t1, step.stateAt);
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
  monitor.finish(lastStep ? lastStep.t1 : null, lastStep ? lastStep.stateAt : null, res.impact);
  const found = monitor.found;
  found.sort((a, b) => (a.tdbDays - b.tdbDays) * dir);
  return found;
}
