/**
 * Predicted astrometric RA/Dec of a small body for a list of observations, with the partial derivatives the
 * differential correction needs (METHODS.md §9.1, §9.4).
 *
 * For each observation at t (TDB) seen from the heliocentric observer position R(t):
 * 1. The body's state and [Φ | S] at t come from one propagation per side of the epoch (propagateWithStm; the
 *    plain `propagate` with dense output when no partials are wanted). Observations may lie on both sides.
 * 2. Light time (METHODS.md §9.4): τ_{k+1} = |r(t − τ_k) − R(t) + (r_⊙(t − τ_k) − r_⊙(t))| / c, iterated to 1e-12 d,
 *    in SSB-consistent geometry: the ephemeris is heliocentric, so the Sun's barycentric motion over τ is added,
 *    r_⊙(t − τ) − r_⊙(t) ≈ −v_⊙ τ with v_⊙ = −Σ μ_j v_j / (μ_⊙ + Σ μ_j) (the planets' masses of forces.ts; ~13 m/s,
 *    i.e. up to ~25 km of the line of sight over τ ≈ 0.02 d). r(t − τ) is the Taylor expansion from t with the
 *    velocity and the full model acceleration at t: r(t − τ) = r − v τ + a τ²/2. The omitted jerk term j τ³/6 is
 *    below 1e-12 AU for τ ≤ 0.05 d (computed: |j| ≲ |a| n with n ≲ 0.02/d away from planets; near a planet τ is
 *    tiny). Φ_r(t − τ) = Φ_r(t) − τ Φ_v(t) (dΦ_r/dt = Φ_v), error O(τ² G) ~ 1e-9 relative.
 * 3. Astrometric direction: the light-time-corrected geometric line of sight, with no stellar aberration and no
 *    gravitational deflection (catalogue-relative astrometry, METHODS.md §9.4). RA in [0, 2π), Dec in [−π/2, π/2].
 * 4. Partials, 2 x (6 + np) row-major: row 0 = ∂(α cos δ)/∂p (i.e. cos δ ∂α/∂p), row 1 = ∂δ/∂p, in radians per AU,
 *    per AU/d and per AU/d², p = (x, y, z, vx, vy, vz at the epoch, then the sensitivities in the order given).
 *    With ρ = r(t − τ) − R' and τ = |ρ|/c: dρ/dp = Φ_r − u (ρ̂ᵀ dρ/dp)/c, u = v_body + v_⊙, so
 *    ρ̂ᵀ dρ/dp = ρ̂ᵀΦ_r / (1 + ρ̂·u/c) and dρ/dp = Φ_r − u (ρ̂ᵀΦ_r) / (c + ρ̂·u) (light-time partial included).
 *    cos δ ∂α/∂ρ = (−sin α, cos α, 0)/|ρ|, ∂δ/∂ρ = (−sin δ cos α, −sin δ sin α, cos δ)/|ρ|.
 * The observer velocity is part of the input for completeness; the astrometric model above does not use it (it
 * would enter through stellar aberration, which catalogue-relative astrometry does not have).
 */
import { C_AU_D, GM_AU3_D2 } from '../constants';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import { PERTURBER_GM_AU3_D2 } from '../dynamics/forces';
import { addNonGravInto } from '../dynamics/nongrav';
import { makeForceModel, propagate } from '../dynamics/propagate';
import type { DynamicsModel, NonGravParams, PlanetEphemeris } from '../dynamics/types';
import { propagateWithStm, type SensitivityParameter } from '../dynamics/variational';
import type { Vec3 } from '../vec';

export type PredictObservation = { obsTimeTdbDays: number; observerPositionAu: Vec3; observerVelocityAuD: Vec3 };

export type PredictOptions = {
  /** Epoch of the state, TDB days since J2000. */
  epochTdbDays: number;
  /** Heliocentric ICRF state at the epoch. */
  positionAu: Vec3;
  velocityAuD: Vec3;
  nonGrav: NonGravParams | null;
  /** Default 'n-body' (Sun, planets, Moon, Sun's GR, non-grav). 'two-body': the Sun only (non-grav ignored). */
  model?: DynamicsModel;
  observations: readonly PredictObservation[];
  /** Non-grav parameters whose partial columns are wanted after the 6 state columns (need `nonGrav`'s law). */
  sensitivities?: readonly SensitivityParameter[];
  partials: boolean;
  /** IAS15 epsilon (default 1e-9). */
  tolerance?: number;
  ephemeris?: PlanetEphemeris;
};

export type PredictedAstrometry = {
  raRad: number;
  decRad: number;
  /** Light time τ, days. */
  lightTimeDays: number;
  /** |ρ|, observer to body at the emission time, AU. */
  rangeAu: number;
  /** 2 x (6 + np) row-major (see the module comment), or null when `partials` is false. */
  partials: Float64Array | null;
};

const MU_SUN = GM_AU3_D2.sun;
const MU_TOTAL = MU_SUN + PERTURBER_GM_AU3_D2.reduce((s, m) => s + m, 0);
const TWO_PI = 2 * Math.PI;

/** The Sun's velocity relative to the solar-system barycentre (AU/d) from the heliocentric planet velocities. */
export function sunBarycentricVelocityAuD(eph: PlanetEphemeris, tdbDays: number, scratch = new Float64Array(6)): Vec3 {
  let x = 0, y = 0, z = 0;
  for (let j = 0; j < PERTURBER_GM_AU3_D2.length; j++) {
    eph.stateInto(j, tdbDays, scratch);
    const m = PERTURBER_GM_AU3_D2[j];
    x += m * scratch[3];
    y += m * scratch[4];
    z += m * scratch[5];
  }
  return [-x / MU_TOTAL, -y / MU_TOTAL, -z / MU_TOTAL];
}

type SideSample = { state: Float64Array; phi: Float64Array | null; columns: number };

function checkVec(name: string, v: ArrayLike<number>): void {
  if (v == null || v.length !== 3 || !Number.isFinite(v[0]) || !Number.isFinite(v[1]) || !Number.isFinite(v[2])) {
    throw new RangeError(`${name} must be three finite numbers`);
  }
}

/**
 * Predicted astrometric RA/Dec (and partials) for each observation, in input order. See the module comment for the
 * model. Throws RangeError for non-finite input or sensitivities without a non-grav law.
 */
export function predictAstrometry(opts: PredictOptions): PredictedAstrometry[] {
  const model: DynamicsModel = opts.model ?? 'n-body';
  const sens = opts.sensitivities ?? [];
  const epoch = opts.epochTdbDays;
  if (!Number.isFinite(epoch)) throw new RangeError('epochTdbDays must be finite');
  checkVec('positionAu', opts.positionAu);
  checkVec('velocityAuD', opts.velocityAuD);
  if (sens.length > 0 && !opts.nonGrav) throw new RangeError('non-grav sensitivities need nonGrav (its law); pass zeros with the law to start');
  if (new Set(sens).size !== sens.length) throw new RangeError('each sensitivity once');
  const obs = opts.observations;
  obs.forEach((o, i) => {
    if (!Number.isFinite(o.obsTimeTdbDays)) throw new RangeError(`observation ${i}: obsTimeTdbDays must be finite`);
    checkVec(`observation ${i}: observerPositionAu`, o.observerPositionAu);
    checkVec(`observation ${i}: observerVelocityAuD`, o.observerVelocityAuD);
  });
  if (obs.length === 0) return [];

  const times = obs.map((o) => o.obsTimeTdbDays);
  const lo = times.reduce((a, t) => Math.min(a, t), epoch);
  const hi = times.reduce((a, t) => Math.max(a, t), epoch);
  // The ephemeris also serves the Sun's barycentric velocity (both models) and the n-body acceleration.
  const eph = opts.ephemeris ?? defaultEphemeris(lo - 0.1, hi + 0.1);
  if (lo - 0.05 < eph.startTdbDays || hi + 0.05 > eph.endTdbDays) {
    throw new RangeError(
      `the ephemeris covers [${eph.startTdbDays}, ${eph.endTdbDays}] TDB days but the epoch and observations need [${lo}, ${hi}] (plus light time)`,
    );
  }
  const nonGrav = model === 'n-body' ? opts.nonGrav : null;
  const cols = 6 + sens.length;

  // --- states (and [Φ|S]) at the observation times, one propagation per side of the epoch -------------------
  const samples = new Map<number, SideSample>();
  for (const side of [-1, 1] as const) {
    const ts = [...new Set(times.filter((t) => (side > 0 ? t >= epoch : t < epoch)))];
    if (ts.length === 0) continue;
    if (opts.partials) {
      const r = propagateWithStm({
        positionAu: opts.positionAu,
        velocityAuD: opts.velocityAuD,
        fromTdbDays: epoch,
        outputTdbDays: ts,
        model,
        ephemeris: model === 'n-body' ? eph : undefined,
        nonGrav,
        sensitivities: model === 'n-body' ? sens : [],
        tolerance: opts.tolerance,
      });
      for (const s of r.samples) samples.set(s.tdbDays, { state: s.state, phi: s.phi, columns: s.columns });
    } else {
      statesWithoutPartials(opts, model, eph, nonGrav, ts, samples);
    }
  }

  // --- light time, direction, partials -----------------------------------------------------------------------
  const force = makeForceModel(model, model === 'n-body' ? eph : undefined, nonGrav);
  const acc = new Float64Array(3);
  const scratch = new Float64Array(6);
  const xr = new Float64Array(3), vr = new Float64Array(3);
  return obs.map((o) => {
    const t = o.obsTimeTdbDays;
    const s = samples.get(t);
    if (!s) throw new Error(`internal: no propagated state at ${t}`);
    const st = s.state;
    xr[0] = st[0]; xr[1] = st[1]; xr[2] = st[2];
    vr[0] = st[3]; vr[1] = st[4]; vr[2] = st[5];
    force.accelerations(t, xr, vr, acc);
    const vSun = sunBarycentricVelocityAuD(eph, t, scratch);
    const R = o.observerPositionAu;
    let tau = 0;
    let rho: Vec3 = [st[0] - R[0], st[1] - R[1], st[2] - R[2]];
    for (let k = 0; k < 10; k++) {
      const next = Math.hypot(rho[0], rho[1], rho[2]) / C_AU_D;
      const h = 0.5 * next * next;
      rho = [0, 1, 2].map((c) => st[c] - st[3 + c] * next + acc[c] * h - vSun[c] * next - R[c]) as Vec3;
      const done = Math.abs(next - tau) < 1e-12;
      tau = next;
      if (done) break;
    }
    const range = Math.hypot(rho[0], rho[1], rho[2]);
    tau = range / C_AU_D;
    let ra = Math.atan2(rho[1], rho[0]);
    if (ra < 0) ra += TWO_PI;
    if (ra >= TWO_PI) ra -= TWO_PI;
    const dec = Math.asin(Math.max(-1, Math.min(1, rho[2] / range)));

    let partials: Float64Array | null = null;
    if (opts.partials) {
      const phi = s.phi!;
      const c = s.columns;
      if (c !== cols && !(model === 'two-body' && c === 6)) throw new Error(`internal: STM has ${c} columns, expected ${cols}`);
      // Φ_r(t − τ) = Φ_r(t) − τ Φ_v(t) (+ τ²/2 ∂a/∂p for the parameter columns: near the epoch S is itself
      // O(t²) and that term is then the whole light-time effect), rows 0..2.
      const phiR = new Float64Array(3 * cols);
      for (let i = 0; i < 3; i++) {
        for (let j = 0; j < cols; j++) {
          const a = j < c ? phi[i * c + j] : 0;
          const b = j < c ? phi[(i + 3) * c + j] : 0;
          phiR[i * cols + j] = a - tau * b;
        }
      }
      if (model === 'n-body' && sens.length > 0) {
        for (let k = 0; k < sens.length; k++) {
          const dadp = new Float64Array(3);
          const which = sens[k];
          addNonGravInto(opts.nonGrav!.law, which === 'a1' ? 1 : 0, which === 'a2' ? 1 : 0, which === 'a3' ? 1 : 0, xr, vr, 0, dadp);
          for (let i = 0; i < 3; i++) phiR[i * cols + 6 + k] += 0.5 * tau * tau * dadp[i];
        }
      }
      // Light-time partial: dρ/dp = Φ_r − u (ρ̂ᵀΦ_r)/(c + ρ̂·u), u = body velocity at emission + v_⊙.
      const u: Vec3 = [0, 1, 2].map((k) => st[3 + k] - acc[k] * tau + vSun[k]) as Vec3;
      const rh: Vec3 = [rho[0] / range, rho[1] / range, rho[2] / range];
      const den = C_AU_D + rh[0] * u[0] + rh[1] * u[1] + rh[2] * u[2];
      const sa = Math.sin(ra), ca = Math.cos(ra), sd = Math.sin(dec), cd = Math.cos(dec);
      const gA: Vec3 = [-sa / range, ca / range, 0];
      const gD: Vec3 = [(-sd * ca) / range, (-sd * sa) / range, cd / range];
      partials = new Float64Array(2 * cols);
      for (let j = 0; j < cols; j++) {
        const p0 = phiR[j], p1 = phiR[cols + j], p2 = phiR[2 * cols + j];
        const w = (rh[0] * p0 + rh[1] * p1 + rh[2] * p2) / den;
        const d0 = p0 - u[0] * w, d1 = p1 - u[1] * w, d2 = p2 - u[2] * w;
        partials[j] = gA[0] * d0 + gA[1] * d1 + gA[2] * d2;
        partials[cols + j] = gD[0] * d0 + gD[1] * d1 + gD[2] * d2;
      }
    }
    return { raRad: ra, decRad: dec, lightTimeDays: tau, rangeAu: range, partials };
  });
}

/** States only (no STM): one propagation per side with dense output at the wanted times. */
function statesWithoutPartials(
  opts: PredictOptions,
  model: DynamicsModel,
  eph: PlanetEphemeris,
  nonGrav: NonGravParams | null,
  ts: number[],
  out: Map<number, SideSample>,
): void {
  const epoch = opts.epochTdbDays;
  const dir = ts[0] >= epoch ? 1 : -1;
  const sorted = [...ts].sort((a, b) => (a - b) * dir);
  const last = sorted[sorted.length - 1];
  let i = 0;
  while (i < sorted.length && sorted[i] === epoch) {
    out.set(epoch, { state: Float64Array.from([...opts.positionAu, ...opts.velocityAuD]), phi: null, columns: 0 });
    i++;
  }
  if (i >= sorted.length) return;
  const end = propagate({
    positionAu: opts.positionAu,
    velocityAuD: opts.velocityAuD,
    fromTdbDays: epoch,
    toTdbDays: last,
    model,
    ephemeris: model === 'n-body' ? eph : undefined,
    nonGrav,
    tolerance: opts.tolerance,
    impactBodies: [],
    onStep: (step) => {
      const stepEnd = step.t1;
      while (i < sorted.length && (sorted[i] - stepEnd) * dir <= 0) {
        const state = new Float64Array(6);
        step.stateAt(sorted[i], state);
        out.set(sorted[i], { state, phi: null, columns: 0 });
        i++;
      }
    },
  });
  // Times at the very end of the run (rounding of the last step end).
  while (i < sorted.length) {
    out.set(sorted[i], { state: Float64Array.from([...end.positionAu, ...end.velocityAuD]), phi: null, columns: 0 });
    i++;
  }
}
