/**
 * Lockstep batch integration of Monte Carlo clones (METHODS.md §4.5 "Batches").
 *
 * N clones (typically 128-512) are stepped together by ONE Ias15 instance (dynamics/ias15.ts) over N particles on
 * one time grid, so every substep costs one ephemeris evaluation shared by all clones (NBodyForce caches the
 * planet positions per time; the planet states used by the per-clone monitors go through a small per-body cache,
 * SharedStateCache below, because all clones ask for the same sample times). The predictor-corrector runs a fixed
 * number of iterations (default 2, as in METHODS.md §4.5: otherwise the worst clone sets the count for all).
 *
 * Step size: Ias15's controller takes the smallest time scale over all particles, and the encounter cap
 * h <= rho/(k v_rel) (forces.ts) is the minimum over all clones, so THE CLOSEST CLONE SETS THE BATCH'S STEP.
 * The other clones then take shorter steps than they need; that costs time during an encounter but never accuracy,
 * and batching is still faster (METHODS.md §4.5 measured 6,000-14,000 clone-years/s through a deep encounter vs
 * about 5,000 for one adaptive integration per clone).
 *
 * Per clone, after every accepted step and on that step's dense output (Ias15.stateAt for that particle):
 *  - impact detection with dynamics' ImpactMonitor (surface of Earth, Moon, Venus, Mars by default, as propagate());
 *  - close-approach detection with dynamics' ApproachMonitor (f = rho . rhodot sign change, Brent refinement to
 *    1e-6 d, b-plane from bplane.ts), exactly as findCloseApproaches does for one object.
 * Screen (cost): most clones are far from every monitored body most of the time, so per step and clone the distance
 * and relative speed to each body are computed at the step's ends from the integrator's state (no dense output; one
 * planet state per body and step shared by all clones), and
 *  - a body's approach monitor is not run while a lower bound of the distance over the step exceeds 1.1 maxAu
 *    (no minimum below maxAu can be in the step; see SCREEN_* below for the bound);
 *  - a body's impact check is not run while the clone is at least 3 radii away at both ends of the step (exactly
 *    the case where ImpactMonitor.check does nothing);
 *  - a monitor whose bodies were all skipped in this and the previous step is not called at all.
 * A skipped monitor re-reads its running state from the dense output at the start of the next step it scans.
 * A clone that reaches a surface is recorded as a hit at the surface-crossing time and stops there: it is parked
 * far from every body with zero velocity, its accelerations are forced to zero and its integrator polynomial is
 * cleared (Ias15.resetParticle), so it no longer influences the step size; the rest of the batch goes on.
 *
 * Units: AU, AU/d, TDB days since J2000.0; approaches in km, km/s (CloseApproach of dynamics/approaches.ts).
 */
import { ApproachMonitor, type CloseApproach } from '../dynamics/approaches';
import { NBodyForce } from '../dynamics/forces';
import { Ias15 } from '../dynamics/ias15';
import { ImpactMonitor, type ImpactEvent } from '../dynamics/propagate';
import { bodyIndex, type DynamicsBody, type ForceModel, type NonGravParams, type PlanetEphemeris } from '../dynamics/types';
import { AU_KM, RADIUS_KM } from '../constants';

export type BatchOptions = {
  ephemeris: PlanetEphemeris;
  fromTdbDays: number;
  untilTdbDays: number;
  /** Initial positions (AU) and velocities (AU/d) of the N clones, 3N values each (x0, y0, z0, x1, ...). */
  positionsAu: Float64Array;
  velocitiesAuD: Float64Array;
  /** Non-gravitational parameters: one set for all clones, or per clone (a1, a2, a3 per clone, 3N values). */
  nonGrav?: NonGravParams | { law: NonGravParams['law']; perParticle: Float64Array } | null;
  /** Bodies whose close approaches are recorded (default ['earth']). */
  bodies?: DynamicsBody[];
  /** Approach reporting threshold, AU (default 0.05). */
  maxAu?: number;
  /** Surfaces that stop a clone (default earth, moon, venus, mars, as propagate()). */
  impactBodies?: DynamicsBody[];
  /** IAS15 epsilon (default 1e-9). */
  tolerance?: number;
  /** Predictor-corrector iterations per step (default 2; 0 = adaptive, as for a single object). */
  fixedIterations?: number;
  relativity?: boolean;
};

export type BatchCloneResult = {
  /** Close approaches in time order (impact last, when there is one). */
  approaches: CloseApproach[];
  impact: ImpactEvent | null;
  /** Time the clone stopped (untilTdbDays, or the surface-crossing time). */
  endTdbDays: number;
  /** State at endTdbDays. */
  positionAu: [number, number, number];
  velocityAuD: [number, number, number];
};

export type BatchResult = {
  clones: BatchCloneResult[];
  /** Accepted lockstep steps and batch force evaluations (each evaluation covers every clone). */
  steps: number;
  forceEvaluations: number;
};

const DEFAULT_IMPACT_BODIES: DynamicsBody[] = ['earth', 'moon', 'venus', 'mars'];
/** Where a stopped clone is parked: 1000 AU from the Sun, at rest (its accelerations are zeroed anyway). */
const PARK_POSITION = [1000, 0, 0];
const ZERO3 = [0, 0, 0];
/**
 * Screen of the per-clone monitors: a body's approach monitor is not run in a step when a lower bound of the
 * clone's distance to it over the step exceeds SCREEN_APPROACH_FACTOR x maxAu (the bound uses the distances at the
 * step ends and SCREEN_SPEED_FACTOR x the larger relative speed at the ends + SCREEN_SPEED_MARGIN_AU_D, a generous
 * bound of the relative speed inside one step far from the body, where the speed hardly changes over a step).
 */
const SCREEN_APPROACH_FACTOR = 1.1;
const SCREEN_SPEED_FACTOR = 2;
const SCREEN_SPEED_MARGIN_AU_D = 0.002;

/** Wraps a force model: clones in `parked` get zero acceleration. */
class ParkingForce implements ForceModel {
  evaluations = 0;
  readonly parked: number[] = [];
  constructor(private readonly inner: ForceModel) {}
  accelerations(t: number, x: Float64Array, v: Float64Array, out: Float64Array): void {
    this.evaluations++;
    this.inner.accelerations(t, x, v, out);
    const p = this.parked;
    for (let k = 0; k < p.length; k++) {
      const o = 3 * p[k];
      out[o] = 0; out[o + 1] = 0; out[o + 2] = 0;
    }
  }
  maxStepDays(t: number, x: Float64Array, v: Float64Array): number {
    return this.inner.maxStepDays(t, x, v);
  }
}

/**
 * Planet states shared by all clones: in lockstep every clone's monitors ask for the same sample times, so the
 * last few (body, time) states are kept (a 16-entry ring per body, newest first). Positions pass straight through.
 */
export class SharedStateCache implements PlanetEphemeris {
  readonly startTdbDays: number;
  readonly endTdbDays: number;
  private static readonly SLOTS = 16;
  private readonly times: Float64Array;
  private readonly states: Float64Array;
  private readonly next: Int32Array;
  hits = 0;
  misses = 0;
  constructor(private readonly eph: PlanetEphemeris) {
    this.startTdbDays = eph.startTdbDays;
    this.endTdbDays = eph.endTdbDays;
    this.times = new Float64Array(9 * SharedStateCache.SLOTS).fill(NaN);
    this.states = new Float64Array(9 * SharedStateCache.SLOTS * 6);
    this.next = new Int32Array(9);
  }
  positionsInto(tdbDays: number, out: Float64Array): void {
    this.eph.positionsInto(tdbDays, out);
  }
  stateInto(bodyIndex: number, tdbDays: number, out: Float64Array): void {
    const S = SharedStateCache.SLOTS;
    const base = bodyIndex * S;
    const times = this.times, st = this.states;
    const newest = this.next[bodyIndex] + S - 1;
    for (let r = 0; r < S; r++) {
      const s = (newest - r) % S;
      if (times[base + s] === tdbDays) {
        const o = (base + s) * 6;
        out[0] = st[o]; out[1] = st[o + 1]; out[2] = st[o + 2]; out[3] = st[o + 3]; out[4] = st[o + 4]; out[5] = st[o + 5];
        this.hits++;
        return;
      }
    }
    this.misses++;
    this.eph.stateInto(bodyIndex, tdbDays, out);
    const s = this.next[bodyIndex];
    this.next[bodyIndex] = (s + 1) % S;
    times[base + s] = tdbDays;
    const o = (base + s) * 6;
    st[o] = out[0]; st[o + 1] = out[1]; st[o + 2] = out[2]; st[o + 3] = out[3]; st[o + 4] = out[4]; st[o + 5] = out[5];
  }
}

/** Integrate a batch of clones in lockstep from fromTdbDays to untilTdbDays (see the module comment). */
export function integrateBatch(opts: BatchOptions): BatchResult {
  const n3 = opts.positionsAu.length;
  if (n3 === 0 || n3 % 3 !== 0 || opts.velocitiesAuD.length !== n3) {
    throw new RangeError(`batch needs 3N positions and 3N velocities (got ${opts.positionsAu.length}, ${opts.velocitiesAuD.length})`);
  }
  const n = n3 / 3;
  const from = opts.fromTdbDays, until = opts.untilTdbDays;
  const eph = opts.ephemeris;
  const lo = Math.min(from, until), hi = Math.max(from, until);
  if (lo < eph.startTdbDays || hi > eph.endTdbDays) {
    throw new RangeError(`batch span [${lo}, ${hi}] tdbDays is outside the ephemeris span [${eph.startTdbDays}, ${eph.endTdbDays}]`);
  }
  const dir = until >= from ? 1 : -1;
  const shared = new SharedStateCache(eph);
  const inner = new NBodyForce(shared, { nonGrav: opts.nonGrav ?? null, relativity: opts.relativity ?? true });
  const force = new ParkingForce(inner);
  const integ = new Ias15(force, n, { epsilon: opts.tolerance ?? 1e-9, fixedIterations: opts.fixedIterations ?? 2 });
  integ.reset(from, opts.positionsAu, opts.velocitiesAuD);

  const bodies = opts.bodies ?? ['earth'];
  const maxAu = opts.maxAu ?? 0.05;
  const impactBodies = opts.impactBodies ?? DEFAULT_IMPACT_BODIES;
  const approachMon: ApproachMonitor[] = [];
  const impactMon: (ImpactMonitor | null)[] = [];
  const stateAt: ((t: number, out: Float64Array) => void)[] = [];
  const xView: Float64Array[] = [];
  const active = new Uint8Array(n).fill(1);
  const results: (BatchCloneResult | null)[] = new Array(n).fill(null);
  for (let i = 0; i < n; i++) {
    approachMon.push(new ApproachMonitor(shared, bodies, maxAu, dir));
    const view = integ.x.subarray(3 * i, 3 * i + 3);
    xView.push(view);
    const im = impactBodies.length > 0 ? new ImpactMonitor(shared, impactBodies) : null;
    im?.start(from, view);
    impactMon.push(im);
    stateAt.push((t: number, out: Float64Array) => integ.stateAt(t, out, i));
  }

  // Screen (see the module comment): per clone and body, the distance and relative speed at the step ends, from the
  // integrator's state (no dense output) and one planet state per body and step shared by all clones.
  const screen: number[] = [];
  for (const b of [...bodies, ...impactBodies]) {
    const k = bodyIndex(b);
    if (!screen.includes(k)) screen.push(k);
  }
  const nb = screen.length;
  const approachOf = Int32Array.from(screen, (k) => bodies.findIndex((b) => bodyIndex(b) === k));
  const impactOf = Int32Array.from(screen, (k) => impactBodies.findIndex((b) => bodyIndex(b) === k));
  const impactRadius3 = Float64Array.from(screen, (k) => {
    const b = impactBodies.find((x) => bodyIndex(x) === k);
    return b ? (3 * (RADIUS_KM as Record<string, number>)[b]) / AU_KM : 0;
  });
  const skipApproachBelow = SCREEN_APPROACH_FACTOR * maxAu;
  const planet = new Float64Array(6 * nb);
  const st6 = new Float64Array(6);
  const rhoPrev = new Float64Array(n * nb), vrelPrev = new Float64Array(n * nb);
  const skipA = new Uint8Array(bodies.length), skipI = new Uint8Array(impactBodies.length);
  const loadPlanets = (t: number) => {
    for (let j = 0; j < nb; j++) {
      shared.stateInto(screen[j], t, st6);
      planet.set(st6, 6 * j);
    }
  };
  const X = integ.x, V = integ.v;
  const distances = (i: number, rhoOut: Float64Array, vrelOut: Float64Array) => {
    const o = 3 * i;
    const x = X[o], y = X[o + 1], z = X[o + 2], vx = V[o], vy = V[o + 1], vz = V[o + 2];
    for (let j = 0; j < nb; j++) {
      const p = 6 * j;
      const dx = x - planet[p], dy = y - planet[p + 1], dz = z - planet[p + 2];
      const du = vx - planet[p + 3], dv = vy - planet[p + 4], dw = vz - planet[p + 5];
      rhoOut[i * nb + j] = Math.sqrt(dx * dx + dy * dy + dz * dz);
      vrelOut[i * nb + j] = Math.sqrt(du * du + dv * dv + dw * dw);
    }
  };
  loadPlanets(from);
  for (let i = 0; i < n; i++) distances(i, rhoPrev, vrelPrev);
  const rhoNow = new Float64Array(n * nb), vrelNow = new Float64Array(n * nb);
  // Per clone: 1 when every body of the monitor was skipped in the previous step.
  const quietA = new Uint8Array(n), quietI = new Uint8Array(n);

  const out6 = new Float64Array(6);
  let remaining = n;
  let done = from === until;
  let lastT1: number | null = null;
  while (!done) {
    done = integ.step(until);
    const { t0, t1 } = integ.lastStep;
    const stepEnd = done ? until : t1;
    lastT1 = stepEnd;
    const span = Math.abs(stepEnd - t0);
    loadPlanets(stepEnd);
    for (let i = 0; i < n; i++) {
      if (active[i] === 0) continue;
      distances(i, rhoNow, vrelNow);
      let anyA = 0, anyI = 0;
      for (let j = 0, q = i * nb; j < nb; j++, q++) {
        const r0 = rhoPrev[q], r1 = rhoNow[q];
        const ja = approachOf[j];
        if (ja >= 0) {
          const vmax = SCREEN_SPEED_FACTOR * Math.max(vrelPrev[q], vrelNow[q]) + SCREEN_SPEED_MARGIN_AU_D;
          // Lower bound of the distance over the step: rho(t) >= rho0 - vmax |t - t0| and >= rho1 - vmax |t1 - t|.
          const lower = Math.min(r0, r1, 0.5 * (r0 + r1 - vmax * span));
          const sk = lower > skipApproachBelow ? 1 : 0;
          skipA[ja] = sk;
          anyA |= 1 - sk;
        }
        const ji = impactOf[j];
        if (ji >= 0) {
          // ImpactMonitor.check does nothing for a body that is at least 3 radii away at both ends of the step.
          const sk = r0 >= impactRadius3[j] && r1 >= impactRadius3[j] ? 1 : 0;
          skipI[ji] = sk;
          anyI |= 1 - sk;
        }
      }
      // A monitor whose bodies were all skipped in the previous step too has nothing to update (state already unknown).
      const im = impactMon[i];
      let hit: ImpactEvent | null = null;
      if (im && (anyI === 1 || quietI[i] === 0)) hit = im.check(t0, stepEnd, xView[i], stateAt[i], skipI);
      quietI[i] = anyI === 1 ? 0 : 1;
      const end = hit ? hit.tdbDays : stepEnd;
      const mon = approachMon[i];
      if (anyA === 1 || quietA[i] === 0 || hit) mon.onStep(t0, end, stateAt[i], skipA);
      quietA[i] = anyA === 1 ? 0 : 1;
      if (hit) {
        mon.finish(end, stateAt[i], hit);
        stateAt[i](end, out6);
        results[i] = {
          approaches: sortByTime(mon.found, dir),
          impact: hit,
          endTdbDays: end,
          positionAu: [out6[0], out6[1], out6[2]],
          velocityAuD: [out6[3], out6[4], out6[5]],
        };
        active[i] = 0;
        remaining--;
        force.parked.push(i);
        integ.resetParticle(i, PARK_POSITION, ZERO3);
      }
    }
    rhoPrev.set(rhoNow);
    vrelPrev.set(vrelNow);
    if (remaining === 0) break;
  }
  for (let i = 0; i < n; i++) {
    if (active[i] === 0) continue;
    const mon = approachMon[i];
    mon.finish(lastT1, lastT1 === null ? null : stateAt[i], null);
    results[i] = {
      approaches: sortByTime(mon.found, dir),
      impact: null,
      endTdbDays: until,
      positionAu: [integ.x[3 * i], integ.x[3 * i + 1], integ.x[3 * i + 2]],
      velocityAuD: [integ.v[3 * i], integ.v[3 * i + 1], integ.v[3 * i + 2]],
    };
  }
  return { clones: results as BatchCloneResult[], steps: integ.steps, forceEvaluations: force.evaluations };
}

function sortByTime(found: CloseApproach[], dir: number): CloseApproach[] {
  return found.sort((a, b) => (a.tdbDays - b.tdbDays) * dir);
}
