/**
 * Linear method (issue 4 item 2; METHODS.md §6.2, §6.3): at each nominal close approach,
 *
 *   B_J = d(xi, zeta)/dx(t_CA) . Phi(t_CA, t0)        (2 x n; n = 6 state + the A1..A3 in the covariance)
 *   Gamma_B = B_J Gamma_0 B_J^T,   mean = (xi, zeta) of the nominal orbit
 *   IP_linear = integral of N(mean, Gamma_B) over the capture disk b = R sqrt(1 + v_esc^2 / v_inf^2)
 *
 * - Phi (and the A1..A3 sensitivities) come from the variational equations integrated with the orbit
 *   (dynamics/variational.ts); d(xi, zeta)/dx(t_CA) by central finite differences of bPlaneFromState
 *   (steps 1e-6 of the planet-centred distance and speed: xi and zeta vary on the scale of the encounter geometry).
 * - Miss distance: the planet-centred two-body periapsis distance of a b-plane point at distance |b| from the
 *   centre, r_p(|b|) = (mu/v_inf^2)(sqrt(1 + (|b| v_inf^2/mu)^2) - 1). Its 1-sigma value is the linear one,
 *   |dr_p/db| sqrt(u^T Gamma_B u) with u = b/|b|; the k-sigma RANGES are min and max of r_p over the k-sigma
 *   ellipse of Gamma_B (0 when the ellipse contains the planet's centre), so they stay meaningful when the ellipse
 *   is much longer than the miss distance. A range reaching below the planet's radius means the ellipse reaches
 *   the surface.
 * - Encounter time: t_CA is the root of f = rho . rhodot, so dt_CA = -(rhodot . d rho + rho . d rhodot)/f' with
 *   f' = |rhodot|^2 + rho . rhoddot (METHODS.md §5.1), rhoddot = acceleration of the orbit (force model) minus the
 *   planet's (central difference of the ephemeris velocity, +-1e-3 d). For an impact the time is the
 *   surface-crossing time, and its sigma is that of the closest-approach time of the same trajectory (approximate).
 * - Validity (METHODS.md §6.3: "check with samples"): the linear map is tested with the two solutions at +-3 sigma
 *   along the b-plane major axis (the minimum-norm initial displacement delta x0 = Gamma_0 B_J^T w / sigma_w that
 *   moves the b-plane point by one sigma along w): each is propagated with the full dynamics and its b-plane point
 *   compared with the linear prediction; the map is called linear when both errors are below 10% of the 3-sigma
 *   semi-axis (threshold: Tocsin choice, common practice, no source).
 *   That check is blind in the tail (tests/unit/engine-assess-tail.test.ts: passes at 0.093% while the linear IP is
 *   11x too high), so a near-disk test follows: one more solution displaced along the same direction to where the
 *   linear trace comes closest to the disk centre (clamped to +-3 sigma; skipped within 0.05 sigma of the nominal) is
 *   propagated; the cross-trace (minor-axis) part of its b-plane error and its capture radius (from its own v_inf)
 *   minus the nominal's give the error delta of the gap to the disk edge, in sigma_minor. With m the linear gap from
 *   the trace to the disk edge in sigma_minor (0 when the trace crosses the disk), the tail IP may be off by
 *   exp(|m delta| + delta^2/2) (the Gaussian tail across a straight edge; common practice, no source); above a
 *   factor 2 (the tolerance assess.ts uses between linear and LOV) the linear result is not valid, unless the IP
 *   times that factor is still at most 1e-12 (the floor below which assess.ts ignores a linear/LOV split).
 *   An earlier encounter deeper than 0.01 AU
 *   (about Earth's Hill radius, METHODS.md §4.4) is also reported: the covariance map "becomes invalid after a deep
 *   encounter" (METHODS.md §6.2).
 */
import { AU_KM, DAY_S, GM_KM3_S2, RADIUS_KM } from '../constants';
import { bPlaneFromState, findCloseApproaches, type CloseApproach } from '../dynamics';
import { bodyIndex } from '../dynamics/types';
import { NBodyForce } from '../dynamics/forces';
import type { NonGravParams, PlanetEphemeris } from '../dynamics/types';
import { propagateWithStm, type SensitivityParameter } from '../dynamics/variational';
import type { EphemerisBody } from '../ephemeris';
import { linearImpactProbability, captureRadiusFromVInfKm, type LinearImpactProbability } from '../risk';
import type { Vec3 } from '../vec';

const AUD_TO_KMS = AU_KM / DAY_S;

/** A point in the solution's parameter space: state (AU, AU/d) and the non-grav parameters. */
export type SolutionPoint = {
  epochTdbDays: number;
  positionAu: Vec3;
  velocityAuD: Vec3;
  nonGrav: NonGravParams | null;
};

/** The validated covariance the methods work with (rows named x..vz [, a1..a3]). */
export type WorkingCovariance = {
  names: string[];
  n: number;
  /** row-major n x n */
  matrix: Float64Array;
};

/** Apply a displacement in the covariance's parameter space (order of names) to a solution point. */
export function displace(p: SolutionPoint, names: readonly string[], delta: ArrayLike<number>, scale = 1): SolutionPoint {
  const r: Vec3 = [...p.positionAu];
  const v: Vec3 = [...p.velocityAuD];
  let ng = p.nonGrav ? { ...p.nonGrav } : null;
  names.forEach((name, k) => {
    const d = delta[k] * scale;
    if (k < 3) r[k] += d;
    else if (k < 6) v[k - 3] += d;
    else if (ng && (name === 'a1' || name === 'a2' || name === 'a3')) ng = { ...ng, [name]: ng[name] + d };
  });
  return { epochTdbDays: p.epochTdbDays, positionAu: r, velocityAuD: v, nonGrav: ng };
}

/** Capture radius (km) for a body with a radius in constants.ts, else null. */
export function captureRadiusFor(body: EphemerisBody, vInfinityKmS: number | null): number | null {
  const R = (RADIUS_KM as Record<string, number>)[body];
  const mu = (GM_KM3_S2 as Record<string, number>)[body];
  if (R === undefined || mu === undefined || vInfinityKmS === null || !(vInfinityKmS > 0)) return null;
  return captureRadiusFromVInfKm(vInfinityKmS, R, mu);
}

/** Planet-centred two-body periapsis distance (km) for impact parameter b (km). */
export function periapsisFromImpactParameterKm(bKm: number, vInfKmS: number, muKm3S2: number): number {
  const k = muKm3S2 / (vInfKmS * vInfKmS);
  const x = bKm / k;
  // sqrt(1 + x^2) - 1 without cancellation for small x
  return k * ((x * x) / (Math.sqrt(1 + x * x) + 1));
}

/** (xi, zeta) in km from a heliocentric state (AU, AU/d) and the planet's state, or null (bound). */
export function bPlaneOfHelioState(
  x: ArrayLike<number>,
  planet: ArrayLike<number>,
  muKm3S2: number,
): { xiKm: number; zetaKm: number; vInfinityKmS: number } | null {
  const rel: Vec3 = [(x[0] - planet[0]) * AU_KM, (x[1] - planet[1]) * AU_KM, (x[2] - planet[2]) * AU_KM];
  const relV: Vec3 = [(x[3] - planet[3]) * AUD_TO_KMS, (x[4] - planet[4]) * AUD_TO_KMS, (x[5] - planet[5]) * AUD_TO_KMS];
  const vP: Vec3 = [planet[3] * AUD_TO_KMS, planet[4] * AUD_TO_KMS, planet[5] * AUD_TO_KMS];
  const bp = bPlaneFromState(rel, relV, muKm3S2, vP);
  return bp ? { xiKm: bp.xiKm, zetaKm: bp.zetaKm, vInfinityKmS: bp.vInfinityKmS } : null;
}

/** d(xi, zeta)/dx (2 x 6, km per AU and km per AU/d) by central differences of bPlaneFromState. */
export function bPlanePartials(x: Float64Array, planet: Float64Array, muKm3S2: number): Float64Array | null {
  const rho = Math.hypot(x[0] - planet[0], x[1] - planet[1], x[2] - planet[2]);
  const spd = Math.hypot(x[3] - planet[3], x[4] - planet[4], x[5] - planet[5]);
  const out = new Float64Array(12);
  const y = new Float64Array(6);
  for (let k = 0; k < 6; k++) {
    const h = 1e-6 * (k < 3 ? rho : spd);
    y.set(x);
    y[k] = x[k] + h;
    const p = bPlaneOfHelioState(y, planet, muKm3S2);
    y[k] = x[k] - h;
    const m = bPlaneOfHelioState(y, planet, muKm3S2);
    if (!p || !m) return null;
    out[k] = (p.xiKm - m.xiKm) / (2 * h);
    out[6 + k] = (p.zetaKm - m.zetaKm) / (2 * h);
  }
  return out;
}

/** Min and max of |b| over the ellipse {m + k L u : |u| <= 1} (L L^T = Gamma), km. */
export function ellipseDistanceRange(meanKm: [number, number], cov: number[][], k: number): [number, number] {
  const a = cov[0][0], b = cov[0][1], c = cov[1][1];
  const l11 = Math.sqrt(a);
  const l21 = b / l11;
  const l22 = Math.sqrt(Math.max(0, c - l21 * l21));
  // Origin inside the ellipse?  |L^-1 (0 - m)| <= k
  const z1 = -meanKm[0] / l11;
  const z2 = (-meanKm[1] - l21 * z1) / (l22 || 1e-300);
  const inside = Math.hypot(z1, z2) <= k;
  let lo = Infinity, hi = 0;
  const N = 3600;
  for (let i = 0; i < N; i++) {
    const th = (2 * Math.PI * i) / N;
    const u1 = Math.cos(th), u2 = Math.sin(th);
    const px = meanKm[0] + k * l11 * u1;
    const pz = meanKm[1] + k * (l21 * u1 + l22 * u2);
    const d = Math.hypot(px, pz);
    if (d < lo) lo = d;
    if (d > hi) hi = d;
  }
  return [inside ? 0 : lo, hi];
}

export type LinearValidity = {
  /** true: passed the +-3 sigma check and no earlier deep encounter; false: failed; null: not checked. */
  valid: boolean | null;
  /** Largest |b_actual - b_linear| / (3 sigma_major) of the two 3-sigma test solutions, or null. */
  nonlinearity: number | null;
  reasons: string[];
  /** The near-disk test (absent when not run: no capture radius, or the disk is within 0.05 sigma of the nominal). */
  nearDisk?: NearDiskCheck;
};

/** Near-disk test of the linear map (see module comment). Signs: gap errors > 0 mean the linear gap is too small. */
export type NearDiskCheck = {
  /** Where the test solution was taken, in major-axis sigmas from the nominal (clamped to +-3). */
  alongSigmas: number;
  clamped: boolean;
  /** Cross-trace (minor-axis) error of the propagated b-plane point vs the linear prediction, > 0 = farther from the centre. */
  crossTraceErrorKm: number;
  crossTraceErrorSigmaMinor: number;
  /** Capture radius of the test solution (from its v_inf) minus the nominal's, km. */
  captureRadiusChangeKm: number;
  /** m: linear gap from the trace to the disk edge, sigma_minor (0 when the trace crosses the disk). */
  gapSigmaMinor: number;
  /** delta: error of that gap, sigma_minor (cross-trace error minus capture-radius change). */
  gapErrorSigmaMinor: number;
  /** exp(|m delta| + delta^2/2), null when it overflows (then see tailFactorLog10). */
  tailFactor: number | null;
  tailFactorLog10: number;
  /** The linear IP times the factor is still <= TAIL_IP_FLOOR: the factor is not held against the linear result. */
  negligible: boolean;
};

export type LinearApproachResult = {
  /** Index in the nominal approach list. */
  index: number;
  approach: CloseApproach;
  /** 2 x n, km per parameter unit, rows xi, zeta. */
  bPlaneJacobian: number[][] | null;
  bPlaneCovarianceKm2: number[][] | null;
  captureRadiusKm: number | null;
  ip: LinearImpactProbability | null;
  distanceSigmaKm: number | null;
  distanceRangeKm: { oneSigma: [number, number]; threeSigma: [number, number] } | null;
  timeSigmaDays: number | null;
  timeRangeTdbDays: { oneSigma: [number, number]; threeSigma: [number, number] } | null;
  validity: LinearValidity;
  /** Why a number is null, when it is. */
  notes: string[];
};

export type LinearContext = {
  nominal: SolutionPoint;
  covariance: WorkingCovariance;
  ephemeris: PlanetEphemeris;
  untilTdbDays: number;
  bodies: EphemerisBody[];
  maxAu: number;
  tolerance?: number;
  /** Run the +-3 sigma propagation check (default true). */
  checkLinearity?: boolean;
};

function quadForm(row: ArrayLike<number>, m: Float64Array, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += row[i] * m[i * n + j] * row[j];
  return s;
}

/** Nominal close approaches of a solution point (the full dynamics). */
export function approachesOf(p: SolutionPoint, ctx: Pick<LinearContext, 'ephemeris' | 'untilTdbDays' | 'bodies' | 'maxAu' | 'tolerance'>, untilTdbDays = ctx.untilTdbDays, maxAu = ctx.maxAu): CloseApproach[] {
  return findCloseApproaches({
    positionAu: p.positionAu,
    velocityAuD: p.velocityAuD,
    fromTdbDays: p.epochTdbDays,
    untilTdbDays,
    bodies: ctx.bodies,
    maxAu,
    model: 'n-body',
    ephemeris: ctx.ephemeris,
    nonGrav: p.nonGrav,
    tolerance: ctx.tolerance,
  });
}

/** b-plane Jacobian B_J (2 x n) of an approach of solution point p, with the state at t_CA. */
export function bPlaneJacobianAt(
  p: SolutionPoint,
  names: readonly string[],
  approach: { body: EphemerisBody; tdbDays: number },
  ephemeris: PlanetEphemeris,
  tolerance?: number,
): { bj: Float64Array; state: Float64Array; phi: Float64Array } | null {
  const params = names.slice(6) as SensitivityParameter[];
  const stm = propagateWithStm({
    positionAu: p.positionAu,
    velocityAuD: p.velocityAuD,
    fromTdbDays: p.epochTdbDays,
    outputTdbDays: [approach.tdbDays],
    model: 'n-body',
    ephemeris,
    nonGrav: p.nonGrav,
    sensitivities: params,
    tolerance,
  });
  const s = stm.samples[0];
  return bJacobianFromSample(s.state, s.phi, s.columns, approach, ephemeris);
}

function bJacobianFromSample(
  state: Float64Array,
  phi: Float64Array,
  cols: number,
  approach: { body: EphemerisBody; tdbDays: number },
  ephemeris: PlanetEphemeris,
): { bj: Float64Array; state: Float64Array; phi: Float64Array } | null {
  const planet = new Float64Array(6);
  ephemeris.stateInto(bodyIndex(approach.body), approach.tdbDays, planet);
  const db = bPlanePartials(state, planet, GM_KM3_S2[approach.body]);
  if (!db) return null;
  const bj = new Float64Array(2 * cols);
  for (let r = 0; r < 2; r++) for (let c = 0; c < cols; c++) {
    let s = 0;
    for (let k = 0; k < 6; k++) s += db[6 * r + k] * phi[k * cols + c];
    bj[r * cols + c] = s;
  }
  return { bj, state, phi };
}

/** The linear method at every nominal approach. */
export function linearAssessment(ctx: LinearContext, nominalApproaches?: CloseApproach[]): LinearApproachResult[] {
  const { nominal, covariance, ephemeris } = ctx;
  const n = covariance.n;
  const G0 = covariance.matrix;
  const approaches = nominalApproaches ?? approachesOf(nominal, ctx);
  const params = covariance.names.slice(6) as SensitivityParameter[];
  const times = approaches.map((a) => a.tdbDays);
  const stm = times.length
    ? propagateWithStm({
        positionAu: nominal.positionAu,
        velocityAuD: nominal.velocityAuD,
        fromTdbDays: nominal.epochTdbDays,
        outputTdbDays: times,
        model: 'n-body',
        ephemeris,
        nonGrav: nominal.nonGrav,
        sensitivities: params,
        tolerance: ctx.tolerance,
      })
    : { samples: [] };
  const sampleAt = (t: number) => stm.samples.find((s) => s.tdbDays === t)!;
  const force = new NBodyForce(ephemeris, { nonGrav: nominal.nonGrav });
  const results: LinearApproachResult[] = [];

  approaches.forEach((a, index) => {
    const notes: string[] = [];
    const res: LinearApproachResult = {
      index,
      approach: a,
      bPlaneJacobian: null,
      bPlaneCovarianceKm2: null,
      captureRadiusKm: null,
      ip: null,
      distanceSigmaKm: null,
      distanceRangeKm: null,
      timeSigmaDays: null,
      timeRangeTdbDays: null,
      validity: { valid: null, nonlinearity: null, reasons: [] },
      notes,
    };
    results.push(res);
    const s = sampleAt(a.tdbDays);
    const cols = s.columns;
    const planet = new Float64Array(6);
    ephemeris.stateInto(bodyIndex(a.body), a.tdbDays, planet);

    // Encounter time sigma (independent of the b-plane).
    const x = s.state;
    const rho = [x[0] - planet[0], x[1] - planet[1], x[2] - planet[2]];
    const rhod = [x[3] - planet[3], x[4] - planet[4], x[5] - planet[5]];
    const acc = new Float64Array(3);
    force.accelerations(a.tdbDays, x.slice(0, 3), x.slice(3, 6), acc);
    const pp = new Float64Array(6), pm = new Float64Array(6);
    const dtp = 1e-3;
    ephemeris.stateInto(bodyIndex(a.body), a.tdbDays + dtp, pp);
    ephemeris.stateInto(bodyIndex(a.body), a.tdbDays - dtp, pm);
    const rhodd = [0, 1, 2].map((i) => acc[i] - (pp[3 + i] - pm[3 + i]) / (2 * dtp));
    const fPrime = rhod[0] ** 2 + rhod[1] ** 2 + rhod[2] ** 2 + rho[0] * rhodd[0] + rho[1] * rhodd[1] + rho[2] * rhodd[2];
    const c = [...rhod, ...rho].map((v) => -v / fPrime); // dt/dx(t_CA)
    const cRow = new Float64Array(cols);
    for (let j = 0; j < cols; j++) {
      let sum = 0;
      for (let k = 0; k < 6; k++) sum += c[k] * s.phi[k * cols + j];
      cRow[j] = sum;
    }
    const sigT = Math.sqrt(Math.max(0, quadForm(cRow, G0, n)));
    res.timeSigmaDays = sigT;
    res.timeRangeTdbDays = { oneSigma: [a.tdbDays - sigT, a.tdbDays + sigT], threeSigma: [a.tdbDays - 3 * sigT, a.tdbDays + 3 * sigT] };
    if (a.impact) notes.push('encounter time is the surface-crossing time; its sigma is that of the closest-approach time (approximate)');

    if (!a.bPlane || a.vInfinityKmS === null) {
      notes.push('planet-centred orbit is bound (temporary capture): no b-plane, no linear impact probability');
      return;
    }
    const jac = bJacobianFromSample(s.state, s.phi, cols, a, ephemeris);
    if (!jac) {
      notes.push('b-plane partials undefined (bound planet-centred orbit within the difference steps)');
      return;
    }
    const bj = jac.bj;
    const gb = [
      [quadForm(bj.subarray(0, n), G0, n), 0],
      [0, quadForm(bj.subarray(n, 2 * n), G0, n)],
    ];
    let xz = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) xz += bj[i] * G0[i * n + j] * bj[n + j];
    gb[0][1] = gb[1][0] = xz;
    res.bPlaneJacobian = [Array.from(bj.subarray(0, n)), Array.from(bj.subarray(n, 2 * n))];
    res.bPlaneCovarianceKm2 = gb;
    const mean: [number, number] = [a.bPlane.xiKm, a.bPlane.zetaKm];
    const mu = GM_KM3_S2[a.body];
    const bAbs = Math.hypot(mean[0], mean[1]);
    // Miss distance (two-body periapsis from |b|).
    const k = mu / a.vInfinityKmS ** 2;
    const xq = bAbs / k;
    const drdb = xq / Math.sqrt(1 + xq * xq);
    const u = bAbs > 0 ? [mean[0] / bAbs, mean[1] / bAbs] : [1, 0];
    const sigB = Math.sqrt(Math.max(0, u[0] * u[0] * gb[0][0] + 2 * u[0] * u[1] * xz + u[1] * u[1] * gb[1][1]));
    res.distanceSigmaKm = drdb * sigB;
    const rp = (b: number) => periapsisFromImpactParameterKm(b, a.vInfinityKmS!, mu);
    try {
      const r1 = ellipseDistanceRange(mean, gb, 1);
      const r3 = ellipseDistanceRange(mean, gb, 3);
      res.distanceRangeKm = { oneSigma: [rp(r1[0]), rp(r1[1])], threeSigma: [rp(r3[0]), rp(r3[1])] };
    } catch {
      notes.push('distance range not computed (degenerate b-plane covariance)');
    }
    const capture = captureRadiusFor(a.body, a.vInfinityKmS);
    res.captureRadiusKm = capture;
    if (capture === null) {
      notes.push(`no radius for ${a.body} in constants.ts: no impact probability`);
    } else {
      try {
        res.ip = linearImpactProbability({ meanKm: mean, covarianceKm2: gb }, capture);
      } catch (err) {
        notes.push(`linear impact probability not computed: ${(err as Error).message}`);
      }
    }

    // Validity.
    const reasons = res.validity.reasons;
    for (const e of approaches.slice(0, index)) {
      if (e.distanceKm < 0.01 * AU_KM) {
        reasons.push(`earlier encounter with ${e.body} at ${Math.round(e.distanceKm)} km (TDB days ${e.tdbDays.toFixed(3)}) may make the linear map invalid`);
      }
    }
    if (ctx.checkLinearity ?? true) {
      checkLinearity(ctx, a, mean, gb, bj, res);
    }
    if (res.validity.valid !== false && reasons.length > 0) res.validity.valid = false;
  });
  return results;
}

/**
 * Tail factor of the near-disk test (see module comment): in the Gaussian tail, ln IP moves by about m delta + delta^2/2
 * when the gap from the trace to the disk edge (m sigma_minor) is off by delta sigma_minor (ln Phi(-(m + delta)) -
 * ln Phi(-m) for the cross-trace tail; common practice, no source). Returns log10 of exp(|m delta| + delta^2/2).
 */
export function tailFactorLog10(gapSigmaMinor: number, gapErrorSigmaMinor: number): number {
  const m = Math.max(0, gapSigmaMinor), d = gapErrorSigmaMinor;
  return (Math.abs(m * d) + 0.5 * d * d) / Math.LN10;
}

/** Tolerance on the tail factor: the factor assess.ts tolerates between linear and LOV. */
export const TAIL_FACTOR_LIMIT = 2;
/**
 * IPs that stay at or below this even when multiplied by the tail factor are not flagged: the floor below which
 * assess.ts ignores a linear/LOV split (Tocsin tolerance, common practice, no source). Far misses (|b| thousands of
 * sigma_minor) have enormous factors on IPs far below it.
 */
export const TAIL_IP_FLOOR = 1e-12;

function formatFactor(log10F: number): string {
  if (log10F < 3) return (10 ** log10F).toFixed(log10F < 1 ? 2 : 1);
  return `1e${log10F.toFixed(1)}`;
}

/** The +-3 sigma propagation check and the near-disk check of the linear b-plane map (see module comment). */
function checkLinearity(ctx: LinearContext, a: CloseApproach, mean: [number, number], gb: number[][], bj: Float64Array, res: LinearApproachResult): void {
  const { covariance } = ctx;
  const n = covariance.n;
  const G0 = covariance.matrix;
  // Major axis w of Gamma_B, minor axis nm.
  const A = gb[0][0], B = gb[0][1], C = gb[1][1];
  const ang = 0.5 * Math.atan2(2 * B, A - C);
  const w = [Math.cos(ang), Math.sin(ang)];
  const nm = [-w[1], w[0]];
  const row = new Float64Array(n);
  for (let j = 0; j < n; j++) row[j] = w[0] * bj[j] + w[1] * bj[n + j];
  const sigW = Math.sqrt(quadForm(row, G0, n));
  if (!(sigW > 0)) return;
  const dx0 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) s += G0[i * n + j] * row[j];
    dx0[i] = s / sigW;
  }
  const until = Math.min(a.tdbDays + 30, ctx.ephemeris.endTdbDays - 1);
  /** The encounter of the test solution at `sigmas` major-axis sigmas, or a failure reason. */
  const encounterAt = (sigmas: number): CloseApproach | string => {
    const p = displace(ctx.nominal, covariance.names, dx0, sigmas);
    let list: CloseApproach[];
    try {
      list = approachesOf(p, ctx, until, Math.max(ctx.maxAu, 0.2));
    } catch (err) {
      return `could not be propagated: ${(err as Error).message}`;
    }
    const same = list.filter((e) => e.body === a.body && Math.abs(e.tdbDays - a.tdbDays) < 30 && e.bPlane);
    if (same.length === 0) return `has no encounter with ${a.body} within 30 days of the nominal one`;
    same.sort((u, v) => Math.abs(u.tdbDays - a.tdbDays) - Math.abs(v.tdbDays - a.tdbDays));
    return same[0];
  };
  const v = res.validity;

  // +-3 sigma test.
  const at3 = new Map<number, CloseApproach>();
  let worst = 0;
  for (const sgn of [-3, 3]) {
    const e = encounterAt(sgn);
    if (typeof e === 'string') {
      v.reasons.push(`the ${sgn > 0 ? '+' : '-'}3-sigma test solution ${e}`);
      v.valid = false;
      if (!e.startsWith('could not')) v.nonlinearity = Infinity;
      return;
    }
    at3.set(sgn, e);
    const bp = e.bPlane!;
    const predX = mean[0] + sgn * sigW * w[0];
    const predZ = mean[1] + sgn * sigW * w[1];
    worst = Math.max(worst, Math.hypot(bp.xiKm - predX, bp.zetaKm - predZ) / (3 * sigW));
  }
  v.nonlinearity = worst;
  if (worst > 0.1) {
    v.valid = false;
    v.reasons.push(`b-plane map is nonlinear: the 3-sigma test solutions land ${(100 * worst).toFixed(0)}% of the 3-sigma semi-axis away from the linear prediction (limit 10%)`);
  } else {
    v.valid = true;
  }

  // Near-disk test: the test solution where the linear trace passes closest to the disk centre.
  const R = res.captureRadiusKm;
  const sigMinor = Math.sqrt(Math.max(0, nm[0] * nm[0] * A + 2 * nm[0] * nm[1] * B + nm[1] * nm[1] * C));
  if (R === null || !(sigMinor > 0)) return;
  const alongKm = mean[0] * w[0] + mean[1] * w[1];
  const crossKm = mean[0] * nm[0] + mean[1] * nm[1];
  const closestSigmas = -alongKm / sigW;
  const t = Math.max(-3, Math.min(3, closestSigmas));
  if (Math.abs(t) < 0.05) return; // the nominal linearisation is exact enough there
  const e = Math.abs(t) === 3 ? at3.get(t)! : encounterAt(t);
  if (typeof e === 'string') {
    v.reasons.push(`the near-disk test solution (${t.toFixed(2)} sigma along the trace) ${e}`);
    v.valid = false;
    return;
  }
  const captureTest = captureRadiusFor(a.body, e.vInfinityKmS);
  if (captureTest === null) return;
  const predX = mean[0] + t * sigW * w[0];
  const predZ = mean[1] + t * sigW * w[1];
  const outward = crossKm < 0 ? -1 : 1; // side of the disk centre the trace passes on
  // > 0: the propagated trace passes farther from the disk centre than the straight line.
  const crossErrorKm = outward * ((e.bPlane!.xiKm - predX) * nm[0] + (e.bPlane!.zetaKm - predZ) * nm[1]);
  const captureChangeKm = captureTest - R;
  const gapErrorSigmaMinor = (crossErrorKm - captureChangeKm) / sigMinor;
  const gapSigmaMinor = Math.max(0, Math.abs(crossKm) - R) / sigMinor;
  if (!Number.isFinite(gapSigmaMinor) || !Number.isFinite(gapErrorSigmaMinor)) return; // degenerate minor axis
  const log10F = tailFactorLog10(gapSigmaMinor, gapErrorSigmaMinor);
  const factor = 10 ** log10F;
  const ip = res.ip ? res.ip.probability : null;
  const negligible = ip !== null && (ip === 0 || Math.log10(ip) + log10F <= Math.log10(TAIL_IP_FLOOR));
  v.nearDisk = {
    alongSigmas: t,
    clamped: t !== closestSigmas,
    crossTraceErrorKm: crossErrorKm,
    crossTraceErrorSigmaMinor: crossErrorKm / sigMinor,
    captureRadiusChangeKm: captureChangeKm,
    gapSigmaMinor,
    gapErrorSigmaMinor,
    tailFactor: Number.isFinite(factor) ? factor : null,
    tailFactorLog10: log10F,
    negligible,
  };
  if (log10F > Math.log10(TAIL_FACTOR_LIMIT) && !negligible) {
    v.valid = false;
    const dir = gapSigmaMinor > 0 ? (gapErrorSigmaMinor > 0 ? ', too high' : ', too low') : '';
    v.reasons.push(
      `near the capture disk the trace is ${Math.abs(crossErrorKm).toFixed(2)} km (${Math.abs(crossErrorKm / sigMinor).toFixed(2)} sigma_minor) ` +
        `${crossErrorKm >= 0 ? 'farther from' : 'closer to'} the disk centre than the linear prediction and the capture radius differs by ${captureChangeKm.toFixed(2)} km ` +
        `(test solution ${t.toFixed(2)} sigma along the trace${t !== closestSigmas ? ', clamped' : ''}; gap to the disk edge ${gapSigmaMinor.toFixed(2)} sigma_minor, off by ${gapErrorSigmaMinor.toFixed(2)}); ` +
        `in this tail the linear IP may be off by a factor ${formatFactor(log10F)}${dir} (limit ${TAIL_FACTOR_LIMIT})`,
    );
  }
}
