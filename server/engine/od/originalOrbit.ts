/**
 * Original (pre-entry) barycentric orbit of a near-parabolic or unbound fit (METHODS.md §3.5 step 2; Marsden,
 * Sekanina & Everhart 1978, AJ 83, 64): the fitted orbit integrated BACKWARD with the engine's n-body model (planets,
 * the Sun's 1PN term, the fitted non-gravitational terms) until the heliocentric distance reaches
 * R_ORIGINAL_AU, then expressed as barycentric two-body elements with μ = GM of the Sun plus every body of the
 * dynamical model (Mercury…Neptune, Earth and Moon separately; DE440 values in constants.ts; Pluto's 7×10⁻⁹ of the
 * Sun is not in the model and not in μ):
 *   r_b = r − R_SSB, v_b = v − V_SSB, R_SSB = Σ μ_j r_j / μ_total (heliocentric, from the run's ephemeris)
 *   1/a = 2/|r_b| − |v_b|²/μ_eff (vis-viva), e from the eccentricity vector, v∞ = √(−μ_eff/a) for 1/a < 0.
 * μ_eff = μ_total, except with the inverse-square non-grav law, whose radial term A1·(1 AU/r)² r̂ acts at any
 * distance exactly like a change of the central GM: μ_eff = μ_total − A1 (AU³/d² with A1 in AU/d²); it is the energy
 * of that motion which is conserved far out. The water-ice g(r) is < 10⁻¹⁴ beyond 50 AU and is left out.
 *
 * Stops: 'distance' (r reached R, located on the dense output), 'aphelion' (a bound orbit turned back inside R: the
 * heliocentric r·v changed sign from inbound to outbound, backward in time), 'time-limit' (ORIGINAL_ORBIT_MAX_YEARS
 * back without either). The elements are those at the stop in every case; only 'distance' is an original orbit.
 *
 * Uncertainty: the gradient g of 1/a (and of e) with respect to x, y, z, vx, vy, vz and the fitted A_k by central
 * finite differences of the whole back-propagation, steps FD_STEP_SIGMA of each parameter's sigma (METHODS §6.2:
 * 10⁻³–10⁻¹ σ); σ² = g Γ gᵀ (linear propagation). The 2n perturbed states are integrated in one batch with the
 * nominal, on its step sequence, and taken at its stop time (see backward()): on the demo visitor σ(1/a) is then the
 * same to 5 digits for steps of 0.1, 0.01 and 0.001 σ and IAS15 epsilon 1e-9…1e-11, where separate adaptive runs
 * gave 4.60e-6, 5.26e-6 and 1.93e-5 /AU at epsilon 1e-9.
 * e_orig is reported with its σ, but with a transverse inverse-square A2 (a torque falling only as 1/r) the angular
 * momentum, and so e, keeps drifting slowly far out; 1/a does not (a·v falls as 1/r³).
 * S = −(1/a)/σ(1/a): positive = unbound.
 */
import { AU_KM, DAY_S, GM_AU3_D2 } from '../constants';
import { brentRoot } from '../dynamics/brent';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import { NBodyForce, PERTURBER_GM_AU3_D2, TwoBodyForce } from '../dynamics/forces';
import { Ias15 } from '../dynamics/ias15';
import type { NonGravParams, PlanetEphemeris } from '../dynamics/types';
import { eccentricityOf } from '../classify';
import type { Vec3 } from '../vec';

/**
 * Heliocentric distance at which the original orbit is taken, AU. METHODS §3.5 gives ~250 AU as customary; 100 AU is
 * used because beyond it the barycentric two-body energy is conserved far below any σ that matters. Measured with
 * this engine (n-body, eps 1e-9): |1/a(100 AU) − 1/a(250 AU)| = 1.1e-8 /AU for a near-parabolic orbit (q 1.5 AU,
 * e 0.99995), 1.0e-7 /AU for a hyperbola with v∞ 26.6 km/s, 6.4e-8 /AU (gravity-only) and 1e-10 /AU (A1, A2) for
 * the demo visitor's fits, whose σ(1/a) are 5e-6 and 4e-5 /AU; Oort-cloud 1/a are ~1e-5–1e-4 /AU. Reaching 250 AU
 * instead costs a near-parabolic orbit ~320 years of ephemeris (13 s) rather than ~80 (2.4 s).
 */
export const R_ORIGINAL_AU = 100;
/**
 * How far back to integrate at most, years. A parabola from q ≈ 1 AU reaches 100 AU in ~80 years; a bound orbit with
 * e > 0.98 and aphelion just beyond 100 AU (a ≈ 50–60 AU) needs nearly half its period, ~180–230 years.
 */
export const ORIGINAL_ORBIT_MAX_YEARS = 250;
/** The original orbit is computed for osculating e above this (near-parabolic or hyperbolic; common practice, no source). */
export const ORIGINAL_ORBIT_MIN_ECCENTRICITY = 0.98;
/** Finite-difference step as a fraction of each parameter's 1-sigma. */
export const FD_STEP_SIGMA = 0.01;
/**
 * IAS15 epsilon of the backward run. On the demo visitor the nominal 1/a moves by 2–5e-8 /AU between epsilon 1e-9,
 * 1e-10 and 1e-11 (σ(1/a) 4.6e-6 /AU); 1e-11 costs ~30% more than 1e-9 and keeps that error far below any σ.
 */
export const ORIGINAL_ORBIT_TOLERANCE = 1e-11;
/** Ephemeris chunk built at a time for the nominal run, years (the cache memoises granules, so chunks overlap cheaply). */
const CHUNK_YEARS = 50;
const YEAR_DAYS = 365.25;
const PARAMS = ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a1', 'a2', 'a3'] as const;

export const MU_TOTAL_AU3_D2 = GM_AU3_D2.sun + PERTURBER_GM_AU3_D2.reduce((s, m) => s + m, 0);

export interface BarycentricElements {
  /** 1/a, 1/AU (negative = hyperbolic) */
  inverseSemiMajorAxisPerAu: number;
  eccentricity: number;
  /** √(−μ/a) in km/s for 1/a < 0, else null */
  vInfinityKmS: number | null;
}

/** Two-body elements of a barycentric state (AU, AU/d) with GM mu (AU³/d²): vis-viva and the eccentricity vector. */
export function barycentricElements(rAu: Vec3, vAuD: Vec3, mu: number): BarycentricElements {
  const r = Math.hypot(rAu[0], rAu[1], rAu[2]);
  const v2 = vAuD[0] ** 2 + vAuD[1] ** 2 + vAuD[2] ** 2;
  const inverseA = 2 / r - v2 / mu;
  return {
    inverseSemiMajorAxisPerAu: inverseA,
    eccentricity: eccentricityOf(rAu, vAuD, mu),
    vInfinityKmS: inverseA < 0 ? (Math.sqrt(-mu * inverseA) * AU_KM) / DAY_S : null,
  };
}

/** Heliocentric state → barycentric state at tdbDays, with the barycentre of the Sun and the model's bodies. */
export function heliocentricToBarycentric(rAu: Vec3, vAuD: Vec3, tdbDays: number, eph: PlanetEphemeris): { rAu: Vec3; vAuD: Vec3 } {
  const s = new Float64Array(6);
  const R = [0, 0, 0], V = [0, 0, 0];
  for (let j = 0; j < PERTURBER_GM_AU3_D2.length; j++) {
    eph.stateInto(j, tdbDays, s);
    const m = PERTURBER_GM_AU3_D2[j] / MU_TOTAL_AU3_D2;
    for (let k = 0; k < 3; k++) {
      R[k] += m * s[k];
      V[k] += m * s[3 + k];
    }
  }
  return {
    rAu: [rAu[0] - R[0], rAu[1] - R[1], rAu[2] - R[2]],
    vAuD: [vAuD[0] - V[0], vAuD[1] - V[1], vAuD[2] - V[2]],
  };
}

/** μ of the far-out motion: μ_total, less A1 for the inverse-square law (see the header). */
export function effectiveMu(nonGrav: NonGravParams | null): number {
  return nonGrav && nonGrav.law === 'inverse-square' ? MU_TOTAL_AU3_D2 - nonGrav.a1 : MU_TOTAL_AU3_D2;
}

export interface OriginalOrbitInput {
  epochTdbDays: number;
  positionAu: Vec3;
  velocityAuD: Vec3;
  nonGrav: NonGravParams | null;
  /** covariance row names: x, y, z, vx, vy, vz then the fitted a1..a3 */
  parameters?: readonly string[];
  covariance?: readonly (readonly number[])[] | null;
  distanceAu?: number;
  maxYears?: number;
  /** IAS15 epsilon (default ORIGINAL_ORBIT_TOLERANCE) */
  tolerance?: number;
  /** finite-difference step as a fraction of each sigma (default FD_STEP_SIGMA) */
  fdStepSigma?: number;
  /** 'n-body' (default) or 'two-body' (Sun only, tests: the original 1/a then equals the osculating one) */
  model?: 'n-body' | 'two-body';
}

export interface OriginalOrbit extends BarycentricElements {
  inverseSemiMajorAxisSigmaPerAu: number | null;
  eccentricitySigma: number | null;
  /** −(1/a)/σ(1/a): positive = unbound; null without covariance */
  unboundSignificance: number | null;
  stop: 'distance' | 'aphelion' | 'time-limit';
  /** where the elements were taken */
  tdbDays: number;
  heliocentricDistanceAu: number;
  yearsBack: number;
  /** GM used, AU³/d² */
  muAu3D2: number;
  /** barycentric state at the stop (AU, AU/d) */
  positionAu: Vec3;
  velocityAuD: Vec3;
}

type Particle = { r: Vec3; v: Vec3; nonGrav: NonGravParams | null };
type BatchStop = { t: number; stop: OriginalOrbit['stop']; states: { r: Vec3; v: Vec3 }[]; eph: PlanetEphemeris | null };

/**
 * All particles integrated backward together on the nominal's (particle 0's) step sequence (IAS15 controlParticles 1),
 * ephemeris built CHUNK_YEARS at a time; stops when particle 0 reaches r = R (located on the dense output, every
 * particle taken at that time), at its aphelion, or at the time limit. One step sequence for all makes the finite
 * differences those of one smooth map: with one adaptive run per particle the differing step sequences showed up as
 * noise in the gradient (at epsilon 1e-9 σ(1/a) of the demo visitor varied by 4× with the step).
 */
function backward(input: OriginalOrbitInput, particles: Particle[], R: number, maxYears: number): BatchStop {
  const model = input.model ?? 'n-body';
  const N = particles.length;
  const tEnd = input.epochTdbDays - maxYears * YEAR_DAYS;
  let t = input.epochTdbDays;
  const x = new Float64Array(3 * N), v = new Float64Array(3 * N);
  particles.forEach((p, i) => {
    x.set(p.r, 3 * i);
    v.set(p.v, 3 * i);
  });
  const law = particles[0].nonGrav?.law ?? null;
  const perParticle = new Float64Array(3 * N);
  particles.forEach((p, i) => p.nonGrav && perParticle.set([p.nonGrav.a1, p.nonGrav.a2, p.nonGrav.a3], 3 * i));
  const out = new Float64Array(6);
  const take = (integ: Ias15 | null, tt: number) =>
    particles.map((_, i) => {
      if (!integ) return { r: [x[3 * i], x[3 * i + 1], x[3 * i + 2]] as Vec3, v: [v[3 * i], v[3 * i + 1], v[3 * i + 2]] as Vec3 };
      integ.stateAt(tt, out, i);
      return { r: [out[0], out[1], out[2]] as Vec3, v: [out[3], out[4], out[5]] as Vec3 };
    });
  const dist = (s: ArrayLike<number>) => Math.hypot(s[0], s[1], s[2]);
  let inbound = x[0] * v[0] + x[1] * v[1] + x[2] * v[2] < 0; // backward in time r grows while r·v < 0
  let eph: PlanetEphemeris | null = model === 'n-body' ? defaultEphemeris(t, t) : null;
  if (dist(x) >= R) return { t, stop: 'distance', states: take(null, t), eph };
  while (t > tEnd) {
    const to = Math.max(tEnd, t - CHUNK_YEARS * YEAR_DAYS);
    eph = model === 'n-body' ? defaultEphemeris(to, t) : null;
    const force = eph ? new NBodyForce(eph, { nonGrav: law ? { law, perParticle } : null }) : new TwoBodyForce();
    const integ = new Ias15(force, N, { epsilon: input.tolerance ?? ORIGINAL_ORBIT_TOLERANCE, controlParticles: 1 });
    integ.reset(t, x, v);
    let done = false;
    while (!done) {
      done = integ.step(to);
      const { t0, t1 } = integ.lastStep;
      const r1 = dist(integ.x);
      if (r1 >= R) {
        const tc = brentRoot((tt) => (integ.stateAt(tt, out, 0), dist(out) - R), t0, t1, 1e-7);
        return { t: tc, stop: 'distance', states: take(integ, tc), eph };
      }
      const rv = integ.x[0] * integ.v[0] + integ.x[1] * integ.v[1] + integ.x[2] * integ.v[2];
      if (rv < 0) inbound = true;
      else if (inbound) return { t: t1, stop: 'aphelion', states: take(integ, t1), eph };
    }
    t = integ.tdbDays;
    x.set(integ.x);
    v.set(integ.v);
  }
  return { t, stop: 'time-limit', states: take(null, t), eph };
}

export function originalOrbit(input: OriginalOrbitInput): OriginalOrbit {
  const R = input.distanceAu ?? R_ORIGINAL_AU;
  const maxYears = input.maxYears ?? ORIGINAL_ORBIT_MAX_YEARS;
  const model = input.model ?? 'n-body';
  const nominalNg = model === 'n-body' ? input.nonGrav : null;

  // particle 0: the fit; then ± a step in each parameter of the covariance
  const particles: Particle[] = [{ r: input.positionAu, v: input.velocityAuD, nonGrav: nominalNg }];
  const cov = input.covariance;
  const names = input.parameters;
  const steps: number[] = [];
  if (cov && names) {
    const idx = names.map((n) => (PARAMS as readonly string[]).indexOf(n));
    if (idx.some((i) => i < 0) || idx.slice(0, 6).some((i, k) => i !== k)) throw new RangeError(`originalOrbit: covariance rows must be x..vz then a1..a3, got ${names.join(', ')}`);
    const p0 = [...input.positionAu, ...input.velocityAuD];
    for (let k = 6; k < names.length; k++) p0.push(nominalNg ? nominalNg[PARAMS[idx[k]] as 'a1' | 'a2' | 'a3'] : 0);
    const particle = (p: number[]): Particle => {
      let ng = nominalNg ? { ...nominalNg } : null;
      if (names.length > 6 && !ng && model === 'n-body') throw new RangeError('originalOrbit: the covariance has A_k rows but the fit has no non-grav parameters');
      if (ng) for (let k = 6; k < p.length; k++) ng[PARAMS[idx[k]] as 'a1' | 'a2' | 'a3'] = p[k];
      if (model !== 'n-body') ng = null;
      return { r: [p[0], p[1], p[2]], v: [p[3], p[4], p[5]], nonGrav: ng };
    };
    for (let k = 0; k < names.length; k++) {
      const h = (input.fdStepSigma ?? FD_STEP_SIGMA) * Math.sqrt(Math.max(0, cov[k][k]));
      steps.push(h);
      const plus = [...p0], minus = [...p0];
      plus[k] += h;
      minus[k] -= h;
      particles.push(particle(plus), particle(minus));
    }
  }
  const end = backward(input, particles, R, maxYears);
  const elementsOf = (i: number) => {
    const s = end.states[i];
    if (!end.eph) return { el: barycentricElements(s.r, s.v, GM_AU3_D2.sun), rb: s.r, vb: s.v, mu: GM_AU3_D2.sun };
    const mu = effectiveMu(particles[i].nonGrav);
    const b = heliocentricToBarycentric(s.r, s.v, end.t, end.eph);
    return { el: barycentricElements(b.rAu, b.vAuD, mu), rb: b.rAu, vb: b.vAuD, mu };
  };
  const nom = elementsOf(0);

  let sigmaInvA: number | null = null;
  let sigmaE: number | null = null;
  if (cov && steps.length > 0 && end.t !== input.epochTdbDays) {
    const n = steps.length;
    const gA: number[] = [], gE: number[] = [];
    for (let k = 0; k < n; k++) {
      const h = steps[k];
      if (!(h > 0)) {
        gA.push(0);
        gE.push(0);
        continue;
      }
      const fp = elementsOf(1 + 2 * k).el, fm = elementsOf(2 + 2 * k).el;
      gA.push((fp.inverseSemiMajorAxisPerAu - fm.inverseSemiMajorAxisPerAu) / (2 * h));
      gE.push((fp.eccentricity - fm.eccentricity) / (2 * h));
    }
    const quad = (g: number[]) => {
      let s2 = 0;
      for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) s2 += g[a] * cov[a][b] * g[b];
      return Math.sqrt(Math.max(0, s2));
    };
    sigmaInvA = quad(gA);
    sigmaE = quad(gE);
  }
  const invA = nom.el.inverseSemiMajorAxisPerAu;
  const r0 = end.states[0].r;
  return {
    ...nom.el,
    inverseSemiMajorAxisSigmaPerAu: sigmaInvA,
    eccentricitySigma: sigmaE,
    unboundSignificance: sigmaInvA !== null && sigmaInvA > 0 ? -invA / sigmaInvA : null,
    stop: end.stop,
    tdbDays: end.t,
    heliocentricDistanceAu: Math.hypot(r0[0], r0[1], r0[2]),
    yearsBack: (input.epochTdbDays - end.t) / YEAR_DAYS,
    muAu3D2: nom.mu,
    positionAu: nom.rb,
    velocityAuD: nom.vb,
  };
}
