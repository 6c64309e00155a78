/**
 * Orbit determination from optical astrometry (issue 8 items 3–5; METHODS.md §9.1–9.3):
 *
 *   observations + observatories
 *     -> observer positions (observer.ts) and unit lines of sight
 *     -> preliminary orbit: Gauss's method on well-spaced triples (gauss.ts), or an existing solution
 *     -> gravity-only differential correction over x, y, z, vx, vy, vz (leastSquares.ts with the partials of
 *        predict.ts), outlier rejection/recovery passes (outliers.ts) until the used set stops changing
 *     -> optionally the non-gravitational fit (x..vz + the chosen A_k) started from the converged gravity-only
 *        solution with A_k = 0, its own outlier passes
 *     -> elements with 1-sigma, unbound significance (classify.ts), encounter uncertainty (encounter.ts),
 *        comparison (compare.ts).
 *
 * Weights: 2x2 blocks from rmsRA (of RA·cos δ), rmsDec and rmsCorr; DEFAULT_OBSERVATION_SIGMA_ARCSEC when missing;
 * an analyst sigma from settings.stationWeights replaces the reported ones for every observation of that station
 * (same sigma for RA·cos δ and Dec, correlation dropped: offices reweight stations whose reported uncertainties are
 * too optimistic or absent); more than four observations of one station in one night are then de-weighted by
 * sqrt(N/4) (nightlyDeweighting).
 * The dynamics are the engine's n-body model (+ the fitted non-grav terms); the epoch is settings.epoch or the
 * middle of the arc rounded to 0h TDB.
 *
 * Choosing the Gauss triple (METHODS §9.3: well spaced; degenerate when D0 → 0): candidate triples are built from
 * the nights of the arc (observations closer than NIGHT_GAP_DAYS belong to one night): the first, middle and last
 * night of the whole arc and of shorter sub-arcs, each night represented by its middle observation. Every admissible
 * root of every triple is scored by the median chi_i² of all observations under two-body motion with light time;
 * the best one starts the differential correction, and when that fit does not converge the next distinct candidates
 * (up to MAX_START_CANDIDATES) are tried. A triple whose Gauss step fails (degenerate, no root) is skipped.
 */
import { createHash } from 'node:crypto';
import {
  DEFAULT_OBSERVATION_SIGMA_ARCSEC,
  type FitResult,
  type FitSettings,
  type NonGravTerm,
  type Observatory,
  type OpticalObservation,
  type OrbitDeterminationResult,
  type Residual,
} from '../../../shared/schemas/od';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import { classifyOrbit, eccentricityOf } from '../classify';
import { C_AU_D, GM_AU3_D2 } from '../constants';
import { propagate } from '../dynamics/propagate';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import type { NonGravParams, PlanetEphemeris } from '../dynamics/types';
import { equatorialToEcliptic } from '../frames';
import { EpochFormatError, formatTdbCalendar, parseEpoch, TimeScaleError, tdbJdFromDays } from '../time';
import { keplerUniversal } from '../twobody/universal';
import { stateToElements } from '../twobody/elements';
import type { Vec3 } from '../vec';
import { engineVersion } from '../version';
import { compareFits } from './compare';
import { encounterUncertainty } from './encounter';
import { ORIGINAL_ORBIT_MIN_ECCENTRICITY, R_ORIGINAL_AU, originalOrbit } from './originalOrbit';
import { GaussError, gaussMethod, type GaussSolution } from './gauss';
import {
  ARCSEC_RAD,
  differentialCorrection,
  observationWeight,
  quadratic2,
  type LeastSquaresProblem,
  type ModelEvaluation,
} from './leastSquares';
import { observationChiSquares, outlierPass } from './outliers';
import { stationStatistics, stationWeightWarnings } from './stationStatistics';
import { observerStatesAu, UnknownObservatoryError } from './observer';
import { predictAstrometry } from './predict';

export type OdErrorCode =
  | 'TOO_FEW_OBSERVATIONS'
  | 'ARC_TOO_SHORT'
  | 'NO_ADMISSIBLE_ROOT'
  | 'UNKNOWN_OBSERVATORY'
  | 'INVALID_INPUT'
  | 'FIT_FAILED';

export class OrbitDeterminationError extends Error {
  constructor(
    readonly code: OdErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'OrbitDeterminationError';
  }
}

/** Thrown when hooks.signal is aborted (name 'AbortError', like fetch's). */
export class FitAbortedError extends Error {
  constructor() {
    super('orbit determination cancelled');
    this.name = 'AbortError';
  }
}

export interface DetermineOrbitInput {
  observations: OpticalObservation[];
  observatories: Observatory[];
  settings: FitSettings;
  initialOrbit?: NormalizedOrbit | null;
  /** indices (into observations) the analyst excluded: never used, never recovered, residuals still reported */
  excludedIndices?: number[];
}

export interface DetermineOrbitHooks {
  onProgress?: (p: { stage: string; done: number; total: number }) => void;
  signal?: AbortSignal;
  /** skip the 20-year encounter search (tests of the fit itself; default false) */
  skipEncounter?: boolean;
  /** skip the original barycentric orbit of near-parabolic/unbound fits (originalOrbit.ts; default false) */
  skipOriginalOrbit?: boolean;
}

/** Observations closer in time than this belong to one night (common practice, no source). */
export const NIGHT_GAP_DAYS = 0.25;
/**
 * Shortest arc accepted, days: half a day, so two consecutive nights at one site always pass while two sessions a
 * few hours apart (different longitudes, one UTC day) do not (common practice, no source).
 */
export const MIN_ARC_DAYS = 0.5;
/** Outlier passes per fit before giving up on a changing set. */
export const MAX_OUTLIER_PASSES = 15;
/** Preliminary orbits tried, best-scored first, until the gravity-only fit converges. */
export const MAX_START_CANDIDATES = 3;

const STATE_PARAMS = ['x', 'y', 'z', 'vx', 'vy', 'vz'] as const;
const DEG = 180 / Math.PI;

const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

/** Δα wrapped to (−π, π]. */
function wrapPi(x: number): number {
  let y = x % (2 * Math.PI);
  if (y <= -Math.PI) y += 2 * Math.PI;
  if (y > Math.PI) y -= 2 * Math.PI;
  return y;
}

function lineOfSight(raRad: number, decRad: number): Vec3 {
  const cd = Math.cos(decRad);
  return [cd * Math.cos(raRad), cd * Math.sin(raRad), Math.sin(decRad)];
}

/** Everything about the observations that does not depend on the orbit. */
interface Arc {
  obs: OpticalObservation[];
  geometry: { obsTimeTdbDays: number; observerPositionAu: Vec3; observerVelocityAuD: Vec3 }[];
  raRad: Float64Array;
  decRad: Float64Array;
  weights: Float64Array;
  obsCovariance: Float64Array;
  sigmaRa: Float64Array;
  sigmaDec: Float64Array;
  /** The nightly de-weighting factor in sigmaRa/sigmaDec (1 for most observations). */
  nightlyFactor: Float64Array;
  locked: Uint8Array;
  ephemeris: PlanetEphemeris;
}

function residualsFor(arc: Arc, predicted: { raRad: number; decRad: number }[]): Float64Array {
  const out = new Float64Array(2 * arc.obs.length);
  for (let i = 0; i < arc.obs.length; i++) {
    const p = predicted[i];
    out[2 * i] = wrapPi(arc.raRad[i] - p.raRad) * Math.cos(p.decRad);
    out[2 * i + 1] = arc.decRad[i] - p.decRad;
  }
  return out;
}

/** Least-squares problem for a fit with the given non-grav terms (parameters x..vz then the terms). */
function makeProblem(arc: Arc, epochTdbDays: number, terms: readonly NonGravTerm[], law: NonGravParams['law'], checkAbort: () => void): LeastSquaresProblem {
  const n = 6 + terms.length;
  return {
    n,
    count: arc.obs.length,
    weights: arc.weights,
    evaluate(p: Float64Array, withPartials: boolean): ModelEvaluation {
      checkAbort();
      let nonGrav: NonGravParams | null = null;
      if (terms.length > 0) {
        nonGrav = { a1: 0, a2: 0, a3: 0, law };
        terms.forEach((t, k) => {
          nonGrav![t] = p[6 + k];
        });
      }
      const pred = predictAstrometry({
        epochTdbDays,
        positionAu: [p[0], p[1], p[2]],
        velocityAuD: [p[3], p[4], p[5]],
        nonGrav,
        model: 'n-body',
        observations: arc.geometry,
        sensitivities: [...terms],
        partials: withPartials,
        ephemeris: arc.ephemeris,
      });
      const residuals = residualsFor(arc, pred);
      let partials: Float64Array | null = null;
      if (withPartials) {
        partials = new Float64Array(2 * arc.obs.length * n);
        for (let i = 0; i < pred.length; i++) {
          const pp = pred[i].partials;
          if (!pp || pp.length !== 2 * n) throw new Error(`predictAstrometry returned ${pp ? pp.length : 'no'} partials, expected ${2 * n}`);
          partials.set(pp, 2 * i * n);
        }
      }
      return { residuals, partials };
    },
  };
}

/** Heliocentric ecliptic (J2000, IAU 1976 obliquity) cometary elements in the units of the result schema. */
function elementVector(r: Vec3, v: Vec3, epoch: number): number[] {
  const el = stateToElements(equatorialToEcliptic(r), equatorialToEcliptic(v), GM_AU3_D2.sun, epoch);
  return [el.q, el.e, el.i * DEG, el.node * DEG, el.argPeri * DEG, el.tp];
}

/**
 * Elements with 1-sigma: Jacobian ∂(elements)/∂(state) by central differences (steps 1e-7 of |r| and |v|; angle
 * differences wrapped to ±180°), σ² = J Γ_xx Jᵀ (linear propagation, the same approach as classify.ts).
 */
function elementsWithSigma(r: Vec3, v: Vec3, epoch: number, cov: number[][] | null): FitResult['elements'] {
  let base: number[];
  try {
    base = elementVector(r, v, epoch);
  } catch {
    return null;
  }
  let sig: (number | null)[] = base.map(() => null);
  if (cov) {
    const state = [...r, ...v];
    const hr = 1e-7 * Math.hypot(...r);
    const hv = 1e-7 * Math.hypot(...v);
    const J: number[][] = base.map(() => new Array(6).fill(0));
    try {
      for (let k = 0; k < 6; k++) {
        const h = k < 3 ? hr : hv;
        const plus = [...state];
        const minus = [...state];
        plus[k] += h;
        minus[k] -= h;
        const ep = elementVector(plus.slice(0, 3) as Vec3, plus.slice(3) as Vec3, epoch);
        const em = elementVector(minus.slice(0, 3) as Vec3, minus.slice(3) as Vec3, epoch);
        for (let e = 0; e < 6; e++) {
          let d = ep[e] - em[e];
          if (e >= 2 && e <= 4) d = ((((d + 180) % 360) + 360) % 360) - 180;
          J[e][k] = d / (2 * h);
        }
      }
      sig = J.map((row) => {
        let s = 0;
        for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) s += row[a] * cov[a][b] * row[b];
        return Math.sqrt(Math.max(0, s));
      });
      if (!sig.every((s) => Number.isFinite(s))) sig = base.map(() => null);
    } catch {
      sig = base.map(() => null);
    }
  }
  const pair = (k: number) => ({ value: base[k], sigma: sig[k] });
  return {
    perihelionDistanceAu: pair(0),
    eccentricity: pair(1),
    inclinationDeg: pair(2),
    ascendingNodeDeg: pair(3),
    argPerihelionDeg: pair(4),
    perihelionTimeTdbDays: pair(5),
  };
}

interface FitRun {
  result: FitResult;
  params: Float64Array;
  used: Uint8Array;
  /** ξᵀWξ per observation */
  plainChi2: Float64Array;
}

/** One fit (given parameter set) with outlier passes. */
function runFit(
  arc: Arc,
  epochTdbDays: number,
  label: FitResult['label'],
  terms: readonly NonGravTerm[],
  settings: FitSettings,
  start: Float64Array,
  startUsed: Uint8Array,
  progress: (stage: string, done: number, total: number) => void,
  checkAbort: () => void,
  warnings: string[],
): FitRun {
  const problem = makeProblem(arc, epochTdbDays, terms, settings.nonGravLaw, checkAbort);
  const n = problem.n;
  const N = arc.obs.length;
  let used = Uint8Array.from(startUsed);
  let params = start;
  const iterations: FitResult['iterations'] = [];
  const seen = new Set<string>();
  let lsq = null as ReturnType<typeof differentialCorrection> | null;
  let chi: { chiSquare: Float64Array; judged: Uint8Array } | null = null;
  const stageName = label === 'gravity-only' ? 'gravity-only fit' : 'non-grav fit';
  for (let pass = 0; pass <= (settings.rejectOutliers ? MAX_OUTLIER_PASSES : 0); pass++) {
    const nUsed = used.reduce((a, b) => a + b, 0);
    const nRej = N - nUsed;
    lsq = differentialCorrection(problem, params, used, {
      maxIterations: settings.maxIterations,
      checkAbort,
      onIteration: (rec) => {
        iterations.push({ iteration: iterations.length + 1, rmsNormalized: rec.rmsNormalized, correctionMeasure: rec.correctionMeasure, used: nUsed, rejected: nRej });
        progress(`${stageName} iteration ${rec.iteration}${pass > 0 ? ` (outliers pass ${pass})` : ''}`, rec.iteration, settings.maxIterations);
      },
    });
    if (lsq.evaluation) params = lsq.params;
    if (lsq.status === 'failed' || !lsq.covariance || !lsq.evaluation) break;
    chi = observationChiSquares(lsq.evaluation.residuals, lsq.evaluation.partials!, arc.obsCovariance, lsq.covariance, used, n);
    // outliers are judged on converged fits only (the residuals of a diverging iteration say nothing)
    if (!settings.rejectOutliers || lsq.status !== 'converged') break;
    const decision = outlierPass(chi.chiSquare, chi.judged, used, arc.locked);
    if (decision.reject.length === 0 && decision.recover.length === 0) break;
    if (pass === MAX_OUTLIER_PASSES) {
      warnings.push(`${label}: the set of used observations still changed after ${MAX_OUTLIER_PASSES} outlier passes`);
      break;
    }
    const next = Uint8Array.from(used);
    for (const i of decision.reject) next[i] = 0;
    for (const i of decision.recover) next[i] = 1;
    const key = Array.from(next).join('');
    if (seen.has(key)) {
      warnings.push(`${label}: outlier rejection cycles between sets; stopped at pass ${pass + 1}`);
      break;
    }
    seen.add(key);
    if (next.reduce((a, b) => a + b, 0) < Math.max(3, Math.ceil(n / 2))) break;
    used = next;
    progress(`outliers pass ${pass + 1} (${label}): ${decision.reject.length} rejected, ${decision.recover.length} recovered`, pass + 1, MAX_OUTLIER_PASSES);
  }
  if (!lsq || !lsq.evaluation) {
    throw new OrbitDeterminationError('FIT_FAILED', `${label} fit: ${lsq?.message ?? 'no evaluation'}`);
  }
  const ev = lsq.evaluation;
  const cov = lsq.covariance;
  if (cov && lsq.status !== 'failed' && !chi) {
    chi = observationChiSquares(ev.residuals, ev.partials!, arc.obsCovariance, cov, used, n);
  }
  const plainChi2 = new Float64Array(N);
  let chi2 = 0;
  let sumSq = 0;
  let nUsed = 0;
  for (let i = 0; i < N; i++) {
    plainChi2[i] = quadratic2(ev.residuals[2 * i], ev.residuals[2 * i + 1], arc.weights, 3 * i);
    if (used[i]) {
      chi2 += plainChi2[i];
      sumSq += ev.residuals[2 * i] ** 2 + ev.residuals[2 * i + 1] ** 2;
      nUsed++;
    }
  }
  const residuals: Residual[] = arc.obs.map((o, i) => ({
    index: i,
    line: o.line,
    stn: o.stn,
    obsTime: o.obsTime,
    obsTimeTdbDays: o.obsTimeTdbDays,
    raCosDecArcsec: ev.residuals[2 * i] / ARCSEC_RAD,
    decArcsec: ev.residuals[2 * i + 1] / ARCSEC_RAD,
    sigmaRaArcsec: arc.sigmaRa[i],
    sigmaDecArcsec: arc.sigmaDec[i],
    chiSquare: chi ? chi.chiSquare[i] : plainChi2[i],
    status: used[i] ? 'used' : 'rejected',
  }));
  const r: Vec3 = [params[0], params[1], params[2]];
  const v: Vec3 = [params[3], params[4], params[5]];
  const covRows = cov ? Array.from({ length: n }, (_, a) => Array.from(cov.subarray(a * n, (a + 1) * n))) : null;
  const stateCov = covRows ? covRows.slice(0, 6).map((row) => row.slice(0, 6)) : null;
  const parameters = [...STATE_PARAMS, ...terms];
  let unboundSignificance: number | null = null;
  let vInfinityKmS: number | null = null;
  try {
    const cls = classifyOrbit({ positionAu: r, velocityAuD: v, covariance: covRows ? { parameters, matrix: covRows } : null });
    unboundSignificance = cls.eccentricity > 1 ? cls.unboundSignificance : null;
    vInfinityKmS = cls.vInfinityKmS;
  } catch {
    /* a degenerate state leaves these null */
  }
  const nonGrav = terms.length > 0 ? { a1: 0, a2: 0, a3: 0, law: settings.nonGravLaw } : null;
  if (nonGrav) terms.forEach((t, k) => (nonGrav[t] = params[6 + k]));
  const result: FitResult = {
    label,
    status: lsq.status,
    message: lsq.message,
    epochTdbDays,
    epochTdbJd: tdbJdFromDays(epochTdbDays),
    positionAu: r,
    velocityAuD: v,
    nonGrav,
    parameters,
    covariance: covRows,
    rmsNormalized: nUsed > 0 ? Math.sqrt(chi2 / (2 * nUsed)) : 0,
    rmsArcsec: nUsed > 0 ? Math.sqrt(sumSq / (2 * nUsed)) / ARCSEC_RAD : 0,
    chiSquare: chi2,
    observationsUsed: nUsed,
    observationsTotal: N,
    degreesOfFreedom: 2 * nUsed - n,
    iterations,
    residuals,
    elements: elementsWithSigma(r, v, epochTdbDays, stateCov),
    unboundSignificance,
    vInfinityKmS,
    encounter: null,
    // the stated (or analyst-set) sigmas, before the nightly de-weighting, are what the station test judges
    stations: stationStatistics(residuals.map((res, i) => ({ ...res, sigmaRaArcsec: res.sigmaRaArcsec / arc.nightlyFactor[i], sigmaDecArcsec: res.sigmaDecArcsec / arc.nightlyFactor[i] }))),
  };
  return { result, params, used, plainChi2 };
}

/**
 * Observations of one station in one night share errors (the same reference stars, seeing, timing), so many of them
 * carry less information than their count suggests (METHODS.md §9.1: de-weight many observations from one night).
 * Rule: a station-night with N > NIGHTLY_FREE_COUNT observations has every sigma scaled by sqrt(N / 4), so the night
 * weighs as four observations (Vereš et al. 2017, Icarus 296, 139, the sqrt(N/4) rule; recalled from memory).
 * Returns the factor per observation (1 for most arcs, whose tracklets have 3 to 4 exposures).
 */
export const NIGHTLY_FREE_COUNT = 4;
export function nightlyDeweighting(obs: readonly Pick<OpticalObservation, 'stn' | 'obsTimeTdbDays'>[]): Float64Array {
  const factors = new Float64Array(obs.length).fill(1);
  const byStation = new Map<string, number[]>();
  obs.forEach((o, i) => {
    const list = byStation.get(o.stn) ?? [];
    list.push(i);
    byStation.set(o.stn, list);
  });
  for (const list of byStation.values()) {
    list.sort((a, b) => obs[a].obsTimeTdbDays - obs[b].obsTimeTdbDays);
    let start = 0;
    for (let k = 1; k <= list.length; k++) {
      if (k === list.length || obs[list[k]].obsTimeTdbDays - obs[list[k - 1]].obsTimeTdbDays > NIGHT_GAP_DAYS) {
        const n = k - start;
        if (n > NIGHTLY_FREE_COUNT) for (let j = start; j < k; j++) factors[list[j]] = Math.sqrt(n / NIGHTLY_FREE_COUNT);
        start = k;
      }
    }
  }
  return factors;
}

/** Group time-sorted indices into nights (gaps > NIGHT_GAP_DAYS). */
function nightsOf(order: number[], obs: OpticalObservation[]): number[][] {
  const nights: number[][] = [];
  for (const i of order) {
    const last = nights[nights.length - 1];
    if (last && obs[i].obsTimeTdbDays - obs[last[last.length - 1]].obsTimeTdbDays <= NIGHT_GAP_DAYS) last.push(i);
    else nights.push([i]);
  }
  return nights;
}

/** Two-body (Sun) astrometric residual score of a candidate state: median chi_i² with light time. */
function twoBodyScore(arc: Arc, usable: number[], state: { r: Vec3; v: Vec3; epoch: number }): number {
  const mu = GM_AU3_D2.sun;
  const chis: number[] = [];
  for (const i of usable) {
    const g = arc.geometry[i];
    let lt = 0;
    let rho: Vec3 = [0, 0, 0];
    let ok = true;
    for (let k = 0; k < 3; k++) {
      try {
        const p = keplerUniversal(state.r, state.v, g.obsTimeTdbDays - lt - state.epoch, mu);
        rho = [p.r[0] - g.observerPositionAu[0], p.r[1] - g.observerPositionAu[1], p.r[2] - g.observerPositionAu[2]];
        lt = Math.hypot(...rho) / C_AU_D;
      } catch {
        ok = false;
        break;
      }
    }
    if (!ok) return Infinity;
    const ra = Math.atan2(rho[1], rho[0]);
    const dec = Math.asin(rho[2] / Math.hypot(...rho));
    const x0 = wrapPi(arc.raRad[i] - ra) * Math.cos(dec);
    const x1 = arc.decRad[i] - dec;
    chis.push(quadratic2(x0, x1, arc.weights, 3 * i));
  }
  chis.sort((a, b) => a - b);
  return chis.length ? chis[Math.floor(chis.length / 2)] : Infinity;
}

interface Preliminary {
  state: { r: Vec3; v: Vec3; epoch: number };
  indices: number[];
  roots: number[];
  chosenRoot: number | null;
}

/**
 * Gauss on candidate triples; every admissible root scored by residuals. Returns up to MAX_START_CANDIDATES
 * distinct candidates, best first (the fit falls back to the next one when a start does not converge).
 */
function preliminaryOrbit(arc: Arc, usable: number[], checkAbort: () => void): Preliminary[] {
  const order = [...usable].sort((a, b) => arc.obs[a].obsTimeTdbDays - arc.obs[b].obsTimeTdbDays);
  const nights = nightsOf(order, arc.obs);
  const mid = (night: number[]) => night[Math.floor(night.length / 2)];
  const triples: number[][] = [];
  const addTriple = (a: number, b: number, c: number) => {
    if (a < 0 || c >= nights.length || !(a < b && b < c)) return;
    const t = [mid(nights[a]), mid(nights[b]), mid(nights[c])];
    if (!triples.some((x) => x.join() === t.join())) triples.push(t);
  };
  const K = nights.length;
  if (K >= 3) {
    // whole arc, then nested and sliding sub-arcs (shorter spans keep the f, g start of Gauss accurate)
    for (const frac of [1, 0.5, 0.25]) {
      const span = Math.max(2, Math.round((K - 1) * frac));
      for (let s = 0; s + span < K; s += Math.max(1, Math.floor(span / 2))) addTriple(s, s + Math.floor(span / 2), s + span);
    }
  } else {
    // two nights: take the first, a middle observation and the last (short arcs: D0 may be tiny)
    const n0 = nights[0];
    const n1 = nights[1];
    const pool = [...n0, ...n1];
    if (pool.length >= 3) {
      const first = pool[0];
      const last = pool[pool.length - 1];
      const middle = n0.length >= 2 ? n0[n0.length - 1] : n1[0];
      if (middle !== first && middle !== last) triples.push([first, middle, last]);
    }
  }
  const scored: { sol: GaussSolution; score: number; indices: number[]; roots: number[] }[] = [];
  const failures: string[] = [];
  for (const t of triples.slice(0, 24)) {
    checkAbort();
    try {
      const res = gaussMethod(
        t.map((i) => ({
          time: arc.obs[i].obsTimeTdbDays,
          observerPosition: arc.geometry[i].observerPositionAu,
          lineOfSight: lineOfSight(arc.raRad[i], arc.decRad[i]),
        })),
        { mu: GM_AU3_D2.sun, speedOfLight: C_AU_D },
      );
      if (res.solutions.length === 0) failures.push(`no admissible root (roots ${res.roots.map((x) => x.toFixed(3)).join(', ') || 'none'})`);
      for (const sol of res.solutions) {
        const score = twoBodyScore(arc, usable, { r: sol.position, v: sol.velocity, epoch: sol.epoch });
        if (Number.isFinite(score)) scored.push({ sol, score, indices: t, roots: res.admissibleRoots });
      }
    } catch (err) {
      if (err instanceof GaussError) failures.push(err.message);
      else throw err;
    }
  }
  if (scored.length === 0) {
    const why = failures.length ? failures[0] : 'no usable triple of observations';
    throw new OrbitDeterminationError('NO_ADMISSIBLE_ROOT', `Gauss's method found no admissible orbit (${triples.length} triples tried): ${why}`);
  }
  scored.sort((x, y) => x.score - y.score);
  const out: Preliminary[] = [];
  for (const c of scored) {
    // distinct orbits only (several triples usually give nearly the same one)
    const same = out.some((o) => Math.hypot(o.state.r[0] - c.sol.position[0], o.state.r[1] - c.sol.position[1], o.state.r[2] - c.sol.position[2]) < 1e-3 * Math.hypot(...c.sol.position) && Math.abs(o.state.epoch - c.sol.epoch) < 1);
    if (same) continue;
    out.push({ state: { r: c.sol.position, v: c.sol.velocity, epoch: c.sol.epoch }, indices: c.indices, roots: c.roots, chosenRoot: c.sol.rootR2 });
    if (out.length >= MAX_START_CANDIDATES) break;
  }
  return out;
}

/** Default epoch: the middle of the arc rounded to 0h TDB (tdbDays = k + 0.5). */
export function defaultFitEpoch(firstTdbDays: number, lastTdbDays: number): number {
  return Math.round((firstTdbDays + lastTdbDays) / 2 - 0.5) + 0.5;
}

/** Station code -> analyst sigma (arcsec) from settings.stationWeights (the schema guarantees each code once). */
export function stationSigmaMap(stationWeights: FitSettings['stationWeights']): Map<string, number> {
  return new Map(stationWeights.map((w) => [w.stn, w.sigmaArcsec]));
}

/**
 * Sigmas of one observation before the nightly de-weighting: an analyst-reweighted station uses its sigma for both
 * RA·cos(dec) and Dec with the correlation dropped (the reported rmsCorr belongs to the reported sigmas being
 * replaced); otherwise the reported rmsRA/rmsDec/rmsCorr, DEFAULT_OBSERVATION_SIGMA_ARCSEC when absent.
 */
export function observationSigmasArcsec(
  o: Pick<OpticalObservation, 'stn' | 'rmsRaArcsec' | 'rmsDecArcsec' | 'rmsCorr'>,
  stationSigma: ReadonlyMap<string, number>,
): { sigmaRaArcsec: number; sigmaDecArcsec: number; rmsCorr: number } {
  const analyst = stationSigma.get(o.stn);
  if (analyst !== undefined) return { sigmaRaArcsec: analyst, sigmaDecArcsec: analyst, rmsCorr: 0 };
  return {
    sigmaRaArcsec: o.rmsRaArcsec ?? DEFAULT_OBSERVATION_SIGMA_ARCSEC,
    sigmaDecArcsec: o.rmsDecArcsec ?? DEFAULT_OBSERVATION_SIGMA_ARCSEC,
    rmsCorr: o.rmsCorr ?? 0,
  };
}

/** A reweighted station with no usable (non-excluded) observation in the fit's input is named, not an error. */
function unusedStationWeightWarnings(stationSigma: ReadonlyMap<string, number>, observations: readonly OpticalObservation[], usable: readonly number[]): string[] {
  const present = new Set(usable.map((i) => observations[i].stn));
  return [...stationSigma.keys()]
    .filter((stn) => !present.has(stn))
    .map((stn) => `station ${stn} is reweighted in the settings but has no usable observation in this fit; its weight was not used`);
}

function sameFlags(a: Uint8Array, b: Uint8Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

export function determineOrbit(input: DetermineOrbitInput, hooks: DetermineOrbitHooks = {}): OrbitDeterminationResult {
  const { observations, observatories, settings } = input;
  const checkAbort = () => {
    if (hooks.signal?.aborted) throw new FitAbortedError();
  };
  const progress = (stage: string, done: number, total: number) => hooks.onProgress?.({ stage, done, total });
  const warnings: string[] = [];
  const N = observations.length;
  const excluded = new Set(input.excludedIndices ?? []);
  for (const i of excluded) {
    if (!Number.isInteger(i) || i < 0 || i >= N) throw new OrbitDeterminationError('INVALID_INPUT', `excluded index ${i} is not an observation index (0..${N - 1})`);
  }
  const usable = observations.map((_, i) => i).filter((i) => !excluded.has(i));
  if (usable.length < 3) {
    throw new OrbitDeterminationError('TOO_FEW_OBSERVATIONS', `an orbit needs at least 3 observations on 2 nights; ${usable.length} usable (of ${N})`);
  }
  const order = [...usable].sort((a, b) => observations[a].obsTimeTdbDays - observations[b].obsTimeTdbDays);
  const nights = nightsOf(order, observations);
  if (nights.length < 2) {
    throw new OrbitDeterminationError('TOO_FEW_OBSERVATIONS', `an orbit needs observations on at least 2 nights (more than ${NIGHT_GAP_DAYS * 24} h apart); all ${usable.length} usable observations are from one night`);
  }
  const first = observations[order[0]];
  const last = observations[order[order.length - 1]];
  const arcDays = last.obsTimeTdbDays - first.obsTimeTdbDays;
  if (arcDays < MIN_ARC_DAYS) {
    throw new OrbitDeterminationError('ARC_TOO_SHORT', `the observed arc is ${(arcDays * 24).toFixed(1)} h; at least ${MIN_ARC_DAYS * 24} h is needed`);
  }
  let epochTdbDays: number;
  if (settings.epoch) {
    try {
      epochTdbDays = parseEpoch(settings.epoch).tdbDays;
    } catch (err) {
      if (err instanceof EpochFormatError || err instanceof TimeScaleError) throw new OrbitDeterminationError('INVALID_INPUT', `epoch: ${err.message}`);
      throw err;
    }
  } else {
    epochTdbDays = defaultFitEpoch(first.obsTimeTdbDays, last.obsTimeTdbDays);
  }

  checkAbort();
  progress('observer positions', 0, 1);
  const tMin = Math.min(first.obsTimeTdbDays, epochTdbDays, input.initialOrbit?.epochTdbDays ?? Infinity);
  const tMax = Math.max(last.obsTimeTdbDays, epochTdbDays, input.initialOrbit?.epochTdbDays ?? -Infinity);
  const ephemeris = defaultEphemeris(tMin - 2, tMax + 2);
  let states;
  try {
    // Stored fits from before the field existed carry no ut1MinusUtcSeconds: UT1 taken as UTC.
    states = observerStatesAu(observations.map((o) => ({ stn: o.stn, obsTimeTdbDays: o.obsTimeTdbDays })), observatories, ephemeris, {
      ut1MinusUtcSeconds: settings.ut1MinusUtcSeconds ?? 0,
    });
  } catch (err) {
    if (err instanceof UnknownObservatoryError) {
      throw new OrbitDeterminationError('UNKNOWN_OBSERVATORY', `unknown observatory code${err.codes.length > 1 ? 's' : ''} ${err.codes.join(', ')} (not in the observatory table)`, { codes: err.codes });
    }
    throw err;
  }
  const weights = new Float64Array(3 * N);
  const obsCovariance = new Float64Array(3 * N);
  const sigmaRa = new Float64Array(N);
  const sigmaDec = new Float64Array(N);
  const nightly = nightlyDeweighting(observations);
  // Stored fits from before the field existed carry no stationWeights: reported uncertainties everywhere.
  const stationSigma = stationSigmaMap(settings.stationWeights ?? []);
  warnings.push(...unusedStationWeightWarnings(stationSigma, observations, usable));
  observations.forEach((o, i) => {
    const s = observationSigmasArcsec(o, stationSigma);
    sigmaRa[i] = s.sigmaRaArcsec * nightly[i];
    sigmaDec[i] = s.sigmaDecArcsec * nightly[i];
    const w = observationWeight(sigmaRa[i], sigmaDec[i], s.rmsCorr);
    weights.set(w.weight, 3 * i);
    obsCovariance.set(w.covariance, 3 * i);
  });
  const arc: Arc = {
    obs: observations,
    geometry: observations.map((o, i) => ({ obsTimeTdbDays: o.obsTimeTdbDays, observerPositionAu: states[i].positionAu, observerVelocityAuD: states[i].velocityAuD })),
    raRad: Float64Array.from(observations, (o) => (o.raDeg * Math.PI) / 180),
    decRad: Float64Array.from(observations, (o) => (o.decDeg * Math.PI) / 180),
    weights,
    obsCovariance,
    sigmaRa,
    sigmaDec,
    nightlyFactor: nightly,
    locked: Uint8Array.from(observations, (_, i) => (excluded.has(i) ? 1 : 0)),
    ephemeris,
  };

  // Preliminary orbit
  checkAbort();
  progress('preliminary orbit', 0, 1);
  type Start = { state: { r: Vec3; v: Vec3; epoch: number }; preliminary: NonNullable<OrbitDeterminationResult['preliminary']> };
  let starts: Start[];
  if (input.initialOrbit) {
    const o = input.initialOrbit;
    starts = [{
      state: { r: o.positionAu as Vec3, v: o.velocityAuD as Vec3, epoch: o.epochTdbDays },
      preliminary: { method: 'initial-solution', observationIndices: [], rootsAu: [], chosenRootAu: null },
    }];
  } else {
    starts = preliminaryOrbit(arc, usable, checkAbort).map((pre) => ({
      state: pre.state,
      preliminary: { method: 'gauss', observationIndices: pre.indices, rootsAu: pre.roots, chosenRootAu: pre.chosenRoot },
    }));
  }
  progress('preliminary orbit', 1, 1);
  const toEpoch = (st: Start['state']): Vec3[] => {
    if (st.epoch === epochTdbDays) return [st.r, st.v];
    try {
      const p = propagate({ positionAu: st.r, velocityAuD: st.v, fromTdbDays: st.epoch, toTdbDays: epochTdbDays, model: 'n-body', ephemeris, nonGrav: null, impactBodies: [] });
      return [p.positionAu, p.velocityAuD];
    } catch {
      const k = keplerUniversal(st.r, st.v, epochTdbDays - st.epoch, GM_AU3_D2.sun);
      warnings.push('the preliminary orbit was moved to the epoch with two-body motion (the n-body propagation failed)');
      return [k.r, k.v];
    }
  };

  // Gravity-only fit from the best preliminary orbit; when it does not converge, from the next candidates (the
  // converged one, else the lowest chi-square, is kept).
  const usedStart = Uint8Array.from(observations, (_, i) => (excluded.has(i) ? 0 : 1));
  let grav: FitRun | null = null;
  let gravWarnings: string[] = [];
  let preliminary: OrbitDeterminationResult['preliminary'] = null;
  let lastError: unknown = null;
  for (let k = 0; k < starts.length; k++) {
    const start = toEpoch(starts[k].state);
    const attemptWarnings: string[] = [];
    let run: FitRun;
    try {
      run = runFit(arc, epochTdbDays, 'gravity-only', [], settings, Float64Array.from([...start[0], ...start[1]]), usedStart, progress, checkAbort, attemptWarnings);
    } catch (err) {
      if (err instanceof FitAbortedError) throw err;
      lastError = err;
      continue;
    }
    const converged = run.result.status === 'converged';
    const better = !grav || (converged && grav.result.status !== 'converged') ||
      (run.result.status === grav.result.status && run.result.chiSquare < grav.result.chiSquare);
    if (better) {
      grav = run;
      gravWarnings = attemptWarnings;
      preliminary = starts[k].preliminary;
      if (k > 0 && converged) gravWarnings.push(`the best-scored preliminary orbit did not lead to a converged fit; preliminary candidate ${k + 1} did`);
    }
    if (converged) break;
  }
  if (!grav) {
    if (lastError instanceof OrbitDeterminationError) throw lastError;
    throw new OrbitDeterminationError('FIT_FAILED', `the gravity-only fit failed from every preliminary orbit: ${(lastError as Error)?.message ?? 'unknown error'}`);
  }
  warnings.push(...gravWarnings);
  if (grav.result.status !== 'converged') warnings.push(`gravity-only fit ${grav.result.status}: ${grav.result.message}`);

  let ng: FitRun | null = null;
  const terms = settings.nonGravTerms;
  if (terms.length > 0) {
    progress('non-grav fit', 0, 1);
    const p0 = new Float64Array(6 + terms.length);
    p0.set(grav.params.subarray(0, 6));
    ng = runFit(arc, epochTdbDays, 'non-gravitational', terms, settings, p0, grav.used, progress, checkAbort, warnings);
    if (ng.result.status !== 'converged') warnings.push(`non-gravitational fit ${ng.result.status}: ${ng.result.message}`);
  }

  /** Closest Earth approach in the 20 years after the arc, with its linear uncertainty, for one fit. */
  const encounterOf = (res: FitResult, covariance: number[][]) =>
    encounterUncertainty({
      epochTdbDays,
      positionAu: res.positionAu,
      velocityAuD: res.velocityAuD,
      nonGrav: res.nonGrav,
      parameters: res.parameters,
      covariance,
      arcEndTdbDays: last.obsTimeTdbDays,
    });

  if (!hooks.skipEncounter) {
    const fits = ng ? [grav, ng] : [grav];
    fits.forEach((f, k) => {
      checkAbort();
      progress('encounter', k, fits.length);
      const res = f.result;
      if (!res.covariance || res.status === 'failed') return;
      try {
        res.encounter = encounterOf(res, res.covariance);
      } catch (err) {
        warnings.push(`${res.label}: encounter uncertainty not computed (${(err as Error).message})`);
      }
    });
    progress('encounter', fits.length, fits.length);
  }

  if (!hooks.skipOriginalOrbit) {
    // only near-parabolic and unbound fits (the stage is reported only when one qualifies)
    const all = ng ? [grav, ng] : [grav];
    for (const f of all) f.result.originalOrbit = null;
    const fits = all.filter((f) => f.result.status !== 'failed' && eccentricityOf(f.result.positionAu, f.result.velocityAuD, GM_AU3_D2.sun) > ORIGINAL_ORBIT_MIN_ECCENTRICITY);
    fits.forEach((f, k) => {
      checkAbort();
      progress('original orbit', k, fits.length);
      const res = f.result;
      try {
        const o = originalOrbit({
          epochTdbDays,
          positionAu: res.positionAu,
          velocityAuD: res.velocityAuD,
          nonGrav: res.nonGrav,
          parameters: res.parameters,
          covariance: res.covariance,
        });
        res.originalOrbit = {
          inverseSemiMajorAxisPerAu: o.inverseSemiMajorAxisPerAu,
          inverseSemiMajorAxisSigmaPerAu: o.inverseSemiMajorAxisSigmaPerAu,
          eccentricity: o.eccentricity,
          eccentricitySigma: o.eccentricitySigma,
          unboundSignificance: o.unboundSignificance,
          vInfinityKmS: o.vInfinityKmS,
          stop: o.stop,
          tdbDays: o.tdbDays,
          tdbCalendar: formatTdbCalendar(o.tdbDays, 0),
          heliocentricDistanceAu: o.heliocentricDistanceAu,
          distanceAu: R_ORIGINAL_AU,
          yearsBack: o.yearsBack,
          muAu3D2: o.muAu3D2,
        };
      } catch (err) {
        warnings.push(`${res.label}: original orbit not computed (${(err as Error).message})`);
      }
    });
    if (fits.length > 0) progress('original orbit', fits.length, fits.length);
  }

  // Δχ² needs both models fitted to one set of observations: when the gravity-only outlier passes rejected
  // observations the non-gravitational fit uses (or the reverse), the gravity-only fit is redone on the
  // non-gravitational fit's set, without outlier passes (compare.ts).
  let sameSet: { plainChi2: Float64Array; used: Uint8Array; result: FitResult } | undefined;
  if (ng && ng.result.status === 'converged' && !sameFlags(grav.used, ng.used)) {
    checkAbort();
    progress('gravity-only fit on the non-grav set', 0, 1);
    const refitWarnings: string[] = [];
    try {
      const refit = runFit(arc, epochTdbDays, 'gravity-only', [], { ...settings, rejectOutliers: false }, Float64Array.from(grav.params.subarray(0, 6)), ng.used, progress, checkAbort, refitWarnings);
      if (refit.result.status === 'converged') {
        sameSet = { plainChi2: refit.plainChi2, used: refit.used, result: refit.result };
        if (!hooks.skipEncounter && refit.result.covariance) {
          try {
            refit.result.encounter = encounterOf(refit.result, refit.result.covariance);
          } catch (err) {
            warnings.push(`gravity-only fit on the non-gravitational fit's observations: encounter uncertainty not computed (${(err as Error).message})`);
          }
        }
      }
      else warnings.push(`the gravity-only fit on the non-gravitational fit's observations ${refit.result.status}; Δχ² is taken over the observations both fits use`);
    } catch (err) {
      if (err instanceof FitAbortedError) throw err;
      warnings.push(`the gravity-only fit on the non-gravitational fit's observations failed (${(err as Error).message}); Δχ² is taken over the observations both fits use`);
    }
    progress('gravity-only fit on the non-grav set', 1, 1);
  }
  // stations whose residuals contradict their stated uncertainties, judged on the richer converged model
  const judged = ng && ng.result.status === 'converged' ? ng.result : grav.result;
  warnings.push(...stationWeightWarnings(judged.label === 'gravity-only' ? 'gravity-only fit' : 'non-gravitational fit', judged.stations ?? []));
  const comparison = ng ? compareFits(grav.result, ng.result, terms, { gravityOnly: grav.plainChi2, nonGrav: ng.plainChi2 }, sameSet) : null;
  const stations = [...new Set(usable.map((i) => observations[i].stn))].sort();
  return {
    engineVersion: engineVersion('orbit determination'),
    observationsSha256: sha256(JSON.stringify(observations)),
    observatoriesSha256: sha256(JSON.stringify(observatories)),
    settings,
    preliminary,
    gravityOnly: grav.result,
    nonGrav: ng ? ng.result : null,
    comparison,
    arc: { firstUtc: first.obsTime, lastUtc: last.obsTime, days: arcDays, observations: usable.length, stations },
    warnings,
  };
}
