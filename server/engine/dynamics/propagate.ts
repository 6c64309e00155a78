/**
 * propagate(): one test particle from (r, v) at fromTdbDays to toTdbDays (forward or backward),
 * n-body or two-body, with a dense-output callback after every accepted step.
 *
 * Impacts (n-body): after every step the distance to Earth, Moon, Venus and Mars (radii in
 * constants.ts RADIUS_KM) is checked on the dense output; when the trajectory reaches a surface the
 * integration stops at the surface-crossing time (the step is truncated there, the integrator never
 * steps through the centre; the encounter step cap h <= rho/(10 v_rel) keeps each step short compared with the
 * distance, METHODS.md §4.4) and the result carries `impact`.
 */
import { AU_KM, RADIUS_KM } from '../constants';
import { brentRoot } from './brent';
import { NBodyForce, TwoBodyForce } from './forces';
import { Ias15 } from './ias15';
import { defaultEphemeris } from './ephemeris-source';
import {
  bodyIndex,
  type DynamicsBody,
  type DynamicsModel,
  type ForceModel,
  type NonGravParams,
  type PlanetEphemeris,
  type StepInfo,
  type Vec3,
} from './types';

export type ImpactEvent = { body: DynamicsBody; tdbDays: number };

export type PropagateOptions = {
  positionAu: Vec3;
  velocityAuD: Vec3;
  fromTdbDays: number;
  toTdbDays: number;
  model: DynamicsModel;
  /** Needed for 'n-body'; when absent one is built over the span (server/engine/ephemeris). */
  ephemeris?: PlanetEphemeris;
  /** Non-gravitational parameters (n-body model only; the two-body model is the pure Kepler problem). */
  nonGrav?: NonGravParams | null;
  /** IAS15 precision parameter epsilon (default 1e-9, REBOUND's default; METHODS.md §4.4). */
  tolerance?: number;
  /** Sun's 1PN term in the n-body model (default true). */
  relativity?: boolean;
  /** Bodies whose surface stops the integration (n-body; default earth, moon, venus, mars). [] disables. */
  impactBodies?: DynamicsBody[];
  /** Called after every accepted step; the stateAt of a StepInfo is valid only during the call. Return 'stop' to end. */
  onStep?: (step: StepInfo) => void | 'stop';
};

export type PropagateResult = {
  positionAu: Vec3;
  velocityAuD: Vec3;
  tdbDays: number;
  steps: number;
  forceEvaluations: number;
  /** True when onStep returned 'stop' or an impact ended the run before toTdbDays. */
  stopped: boolean;
  impact: ImpactEvent | null;
};

const DEFAULT_IMPACT_BODIES: DynamicsBody[] = ['earth', 'moon', 'venus', 'mars'];

/** Build the force model for a run (exported for batch users and the benchmark). */
export function makeForceModel(
  model: DynamicsModel,
  ephemeris: PlanetEphemeris | undefined,
  nonGrav: NonGravParams | null | undefined,
  relativity = true,
): ForceModel {
  if (model === 'two-body') return new TwoBodyForce();
  if (!ephemeris) throw new Error('n-body model needs an ephemeris');
  return new NBodyForce(ephemeris, { nonGrav: nonGrav ?? null, relativity });
}

/** Check that [from, to] lies inside the ephemeris span. */
function checkSpan(eph: PlanetEphemeris, a: number, b: number): void {
  const lo = Math.min(a, b), hi = Math.max(a, b);
  if (lo < eph.startTdbDays || hi > eph.endTdbDays) {
    throw new RangeError(
      `propagation span [${lo}, ${hi}] tdbDays is outside the ephemeris span [${eph.startTdbDays}, ${eph.endTdbDays}]`,
    );
  }
}

export function propagate(opts: PropagateOptions): PropagateResult {
  const { fromTdbDays, toTdbDays, model } = opts;
  let eph = opts.ephemeris;
  if (model === 'n-body') {
    eph ??= defaultEphemeris(fromTdbDays, toTdbDays);
    checkSpan(eph, fromTdbDays, toTdbDays);
  }
  const force = makeForceModel(model, eph, opts.nonGrav, opts.relativity ?? true);
  const integ = new Ias15(force, 1, { epsilon: opts.tolerance ?? 1e-9 });
  integ.reset(fromTdbDays, opts.positionAu, opts.velocityAuD);

  const impactBodies = model === 'n-body' ? (opts.impactBodies ?? DEFAULT_IMPACT_BODIES) : [];
  const monitor = eph && impactBodies.length > 0 ? new ImpactMonitor(eph, impactBodies) : null;
  monitor?.start(fromTdbDays, integ.x);

  const stateAt = (t: number, out: Float64Array) => integ.stateAt(t, out);
  let stopped = false;
  let impact: ImpactEvent | null = null;
  const out = new Float64Array(6);
  let done = fromTdbDays === toTdbDays;
  let endT = fromTdbDays;
  let endState: Float64Array | null = null;
  while (!done) {
    done = integ.step(toTdbDays);
    const { t0, t1 } = integ.lastStep;
    let stepEnd = done ? toTdbDays : t1;
    if (monitor) {
      const hit = monitor.check(t0, stepEnd, integ.x, stateAt);
      if (hit) {
        impact = hit;
        stepEnd = hit.tdbDays;
      }
    }
    const verdict = opts.onStep?.({ t0, t1: stepEnd, stateAt });
    if (impact) {
      integ.stateAt(stepEnd, out);
      endState = out;
      endT = stepEnd;
      stopped = true;
      break;
    }
    if (verdict === 'stop') {
      stopped = !done;
      endT = done ? toTdbDays : t1;
      break;
    }
    endT = done ? toTdbDays : t1;
  }
  const x = endState ? [endState[0], endState[1], endState[2]] : [integ.x[0], integ.x[1], integ.x[2]];
  const v = endState ? [endState[3], endState[4], endState[5]] : [integ.v[0], integ.v[1], integ.v[2]];
  return {
    positionAu: x as Vec3,
    velocityAuD: v as Vec3,
    tdbDays: endT,
    steps: integ.steps,
    forceEvaluations: force.evaluations,
    stopped,
    impact,
  };
}

/**
 * Detects the first surface crossing of any monitored body inside a step, using the step's dense output.
 * Distance rho(t) = |r(t) - r_P(t)|, f(t) = rho . rhodot (geometric).
 */
export class ImpactMonitor {
  private readonly idx: number[];
  private readonly radiusAu: number[];
  private readonly ps = new Float64Array(6);
  private readonly qs = new Float64Array(6);
  private readonly rhoStart: Float64Array;
  private readonly q = new Float64Array(6);

  constructor(
    private readonly eph: PlanetEphemeris,
    private readonly bodies: DynamicsBody[],
  ) {
    this.idx = bodies.map(bodyIndex);
    this.radiusAu = bodies.map((b) => {
      const r = (RADIUS_KM as Record<string, number>)[b];
      if (r === undefined) throw new Error(`no radius for '${b}' in RADIUS_KM`);
      return r / AU_KM;
    });
    this.rhoStart = new Float64Array(bodies.length);
  }

  private rhoAt(j: number, t: number, x: ArrayLike<number>): number {
    this.eph.stateInto(this.idx[j], t, this.ps);
    return Math.hypot(x[0] - this.ps[0], x[1] - this.ps[1], x[2] - this.ps[2]);
  }

  private dense(j: number, t: number, stateAt: (t: number, out: Float64Array) => void): { rho: number; f: number } {
    stateAt(t, this.qs);
    this.eph.stateInto(this.idx[j], t, this.ps);
    const dx = this.qs[0] - this.ps[0], dy = this.qs[1] - this.ps[1], dz = this.qs[2] - this.ps[2];
    const du = this.qs[3] - this.ps[3], dv = this.qs[4] - this.ps[4], dw = this.qs[5] - this.ps[5];
    return { rho: Math.hypot(dx, dy, dz), f: dx * du + dy * dv + dz * dw };
  }

  start(t: number, x: ArrayLike<number>): void {
    for (let j = 0; j < this.idx.length; j++) {
      const rho = this.rhoAt(j, t, x);
      if (rho <= this.radiusAu[j]) throw new Error(`initial state is inside ${this.bodies[j]} (distance ${rho * AU_KM} km)`);
      this.rhoStart[j] = rho;
    }
  }

  /**
   * Returns the earliest surface crossing inside [t0, t1] (dense output valid there), else null.
   * `skip` (optional, one flag per body, batches): the caller has checked that the distance to body j is at least
   * 3 radii at both ends of the step, where this method would do nothing for j; j is then not evaluated and its
   * start distance is re-read from the dense output at the start of the next step that is checked.
   */
  check(t0: number, t1: number, xEnd: ArrayLike<number>, stateAt: (t: number, out: Float64Array) => void, skip?: Uint8Array): ImpactEvent | null {
    let best: ImpactEvent | null = null;
    const tolDays = 1e-4 / 86400; // 0.1 ms
    const q = this.q;
    for (let j = 0; j < this.idx.length; j++) {
      if (skip !== undefined && skip[j] === 1) {
        this.rhoStart[j] = NaN;
        continue;
      }
      const R = this.radiusAu[j];
      let rho0 = this.rhoStart[j];
      if (Number.isNaN(rho0)) rho0 = this.dense(j, t0, stateAt).rho;
      stateAt(t1, q);
      const rho1 = this.rhoAt(j, t1, q);
      this.rhoStart[j] = this.rhoAt(j, t1, xEnd);
      let tIn: number | null = null;
      if (rho1 <= R) {
        tIn = t1;
      } else if (Math.min(rho0, rho1) < 3 * R) {
        // Possible graze inside the step: look at the minimum of rho on the dense output.
        const f0 = this.dense(j, t0, stateAt).f;
        const f1 = this.dense(j, t1, stateAt).f;
        if (Math.sign(f0) * Math.sign(t1 - t0) < 0 && Math.sign(f1) * Math.sign(t1 - t0) > 0) {
          const tm = brentRoot((t) => this.dense(j, t, stateAt).f, t0, t1, tolDays);
          if (this.dense(j, tm, stateAt).rho <= R) tIn = tm;
        }
      }
      if (tIn === null) continue;
      const tc = brentRoot((t) => this.dense(j, t, stateAt).rho - R, t0, tIn, tolDays);
      if (!best || (tc - best.tdbDays) * Math.sign(t1 - t0) < 0) best = { body: this.bodies[j], tdbDays: tc };
    }
    return best;
  }
}
