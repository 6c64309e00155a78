/**
 * Predicted closest Earth approach after the observed arc and its linear 1-sigma (issue 8 item 5: how the encounter
 * uncertainty changes between the gravity-only and the non-gravitational fit; METHODS.md §9.2, §6.2).
 *
 * 1. Propagate the fitted state (n-body, with the fit's non-grav parameters) from the epoch to the end of the arc and
 *    search the next ENCOUNTER_SEARCH_YEARS years for the Earth distance minima (dynamics/approaches.ts with a
 *    search radius large enough to report every minimum); keep the closest (a minimum at the start of the window
 *    counts: an object leaving the Earth has its closest future distance there).
 * 2. Map the fit covariance Γ (parameters x..vz then the fitted A_k) to that time with the state transition matrix
 *    and the non-grav sensitivities (dynamics/variational.ts): Γ_t = Φ Γ Φᵀ (linear propagation).
 * 3. With ρ, u the Earth-relative position and velocity at the minimum (where ρ·u = 0):
 *      σ_distance = √(ρ̂ᵀ Γ_rr ρ̂)          (first-order change of the minimum distance is ρ̂·δr),
 *      σ_time     = √(gᵀ Γ_t g) / (|u|² + ρ·a),  g = (u, ρ)   (the minimum is where f = ρ·u = 0; a first-order
 *                   change δf = u·δr + ρ·δv moves it by −δf / ḟ, ḟ = |u|² + ρ·a with a the relative acceleration:
 *                   the Sun's differential pull and the Earth–Moon attraction, point masses),
 *      largest positional 1-sigma = √λ_max(Γ_rr).
 *    Checked against central differences of the full n-body closest approach (tests/unit/od-fit.test.ts).
 */
import { AU_KM, DAY_S, GM_KM3_S2 } from '../constants';
import { findCloseApproaches } from '../dynamics/approaches';
import { propagate } from '../dynamics/propagate';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import { propagateWithStm, type SensitivityParameter } from '../dynamics/variational';
import type { NonGravParams, PlanetEphemeris } from '../dynamics/types';
import { jacobiEigenSymmetric } from '../linalg/eigen';
import { utcFromTdbDays } from '../time';
import type { Vec3 } from '../vec';

export const ENCOUNTER_SEARCH_YEARS = 20;
const YEAR_DAYS = 365.25;

export interface EncounterInput {
  epochTdbDays: number;
  positionAu: Vec3;
  velocityAuD: Vec3;
  nonGrav: NonGravParams | null;
  /** parameter names of the covariance: x, y, z, vx, vy, vz then a1..a3 (the fitted terms) */
  parameters: readonly string[];
  covariance: readonly (readonly number[])[];
  /** end of the observed arc (TDB days since J2000) */
  arcEndTdbDays: number;
  years?: number;
  ephemeris?: PlanetEphemeris;
}

export interface EncounterUncertainty {
  body: string;
  closeApproachTdbDays: number;
  closeApproachUtc: string;
  distanceKm: number;
  distanceSigmaKm: number;
  positionSigmaMaxKm: number;
  timeSigmaMin: number;
}

export function encounterUncertainty(input: EncounterInput): EncounterUncertainty | null {
  const years = input.years ?? ENCOUNTER_SEARCH_YEARS;
  const start = Math.max(input.arcEndTdbDays, input.epochTdbDays);
  const until = start + years * YEAR_DAYS;
  const eph = input.ephemeris ?? defaultEphemeris(Math.min(input.epochTdbDays, start), until);
  let r0 = input.positionAu;
  let v0 = input.velocityAuD;
  if (start !== input.epochTdbDays) {
    const p = propagate({ positionAu: r0, velocityAuD: v0, fromTdbDays: input.epochTdbDays, toTdbDays: start, model: 'n-body', ephemeris: eph, nonGrav: input.nonGrav, impactBodies: [] });
    r0 = p.positionAu;
    v0 = p.velocityAuD;
  }
  const approaches = findCloseApproaches({
    positionAu: r0,
    velocityAuD: v0,
    fromTdbDays: start,
    untilTdbDays: until,
    bodies: ['earth'],
    maxAu: 1e4,
    ephemeris: eph,
    nonGrav: input.nonGrav,
  });
  if (approaches.length === 0) return null;
  const best = approaches.reduce((a, b) => (b.distanceKm < a.distanceKm ? b : a));

  const sens = input.parameters.slice(6) as SensitivityParameter[];
  const np = sens.length;
  const n = 6 + np;
  if (input.covariance.length !== n) throw new RangeError(`encounter: covariance has ${input.covariance.length} rows, expected ${n}`);
  const stm = propagateWithStm({
    positionAu: input.positionAu,
    velocityAuD: input.velocityAuD,
    fromTdbDays: input.epochTdbDays,
    outputTdbDays: [best.tdbDays],
    model: 'n-body',
    ephemeris: eph,
    nonGrav: input.nonGrav ?? (np > 0 ? { a1: 0, a2: 0, a3: 0, law: 'water-ice' } : null),
    sensitivities: sens,
  });
  const phi = stm.samples[0].phi; // 6 x n
  // Γ_t = Φ Γ Φᵀ (6x6), converted to km and km/s
  const scaleKm = [AU_KM, AU_KM, AU_KM, AU_KM / DAY_S, AU_KM / DAY_S, AU_KM / DAY_S];
  const gt = new Float64Array(36);
  for (let i = 0; i < 6; i++) {
    for (let j = 0; j < 6; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) {
        let t = 0;
        for (let l = 0; l < n; l++) t += input.covariance[k][l] * phi[j * n + l];
        s += phi[i * n + k] * t;
      }
      gt[i * 6 + j] = s * scaleKm[i] * scaleKm[j];
    }
  }
  const quad6 = (a: readonly number[]) => {
    let s = 0;
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) s += a[i] * gt[i * 6 + j] * a[j];
    return Math.max(0, s);
  };
  const rho = best.relPositionKm;
  const u = best.relVelocityKmS;
  const d = Math.hypot(rho[0], rho[1], rho[2]);
  // relative acceleration (km/s²): the Sun's differential pull plus the Earth–Moon system's attraction
  const state = stm.samples[0].state;
  const rObj: Vec3 = [state[0] * AU_KM, state[1] * AU_KM, state[2] * AU_KM];
  const rEarth: Vec3 = [rObj[0] - rho[0], rObj[1] - rho[1], rObj[2] - rho[2]];
  const muS = GM_KM3_S2.sun;
  const muE = GM_KM3_S2.earth + GM_KM3_S2.moon;
  const ro3 = Math.hypot(...rObj) ** 3;
  const re3 = Math.hypot(...rEarth) ** 3;
  const aRel = [0, 1, 2].map((i) => -muS * (rObj[i] / ro3 - rEarth[i] / re3) - (muE * rho[i]) / (d * d * d));
  // at the minimum f = ρ·u = 0: δf = u·δr + ρ·δv, df/dt = |u|² + ρ·a, δt = −δf / (df/dt); δd = ρ̂·δr
  const dfdt = u[0] * u[0] + u[1] * u[1] + u[2] * u[2] + rho[0] * aRel[0] + rho[1] * aRel[1] + rho[2] * aRel[2];
  const timeSigmaS = dfdt > 0 ? Math.sqrt(quad6([u[0], u[1], u[2], rho[0], rho[1], rho[2]])) / dfdt : 0;
  const distanceSigmaKm = Math.sqrt(quad6([rho[0] / d, rho[1] / d, rho[2] / d, 0, 0, 0]));
  const grr = new Float64Array(9);
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) grr[i * 3 + j] = gt[i * 6 + j];
  const eig = jacobiEigenSymmetric(grr, 3);
  const lamMax = Math.max(...Array.from(eig.values));
  return {
    body: best.body,
    closeApproachTdbDays: best.tdbDays,
    closeApproachUtc: utcFromTdbDays(best.tdbDays).utc,
    distanceKm: best.distanceKm,
    distanceSigmaKm,
    positionSigmaMaxKm: Math.sqrt(Math.max(0, lamMax)),
    timeSigmaMin: timeSigmaS / 60,
  };
}
