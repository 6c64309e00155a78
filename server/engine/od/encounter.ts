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
 *      σ_time     = √(uᵀ Γ_rr u) / |u|²     (the along-track displacement shifts the time of the minimum),
 *      largest positional 1-sigma = √λ_max(Γ_rr).
 */
import { AU_KM } from '../constants';
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
  // Γ_rr (AU²) = Φ_r Γ Φ_rᵀ, rows 0..2 of Φ
  const grr = new Float64Array(9);
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) {
        let t = 0;
        for (let l = 0; l < n; l++) t += input.covariance[k][l] * phi[j * n + l];
        s += phi[i * n + k] * t;
      }
      grr[i * 3 + j] = s * AU_KM * AU_KM;
    }
  }
  const rho = best.relPositionKm;
  const u = best.relVelocityKmS;
  const d = Math.hypot(rho[0], rho[1], rho[2]);
  const quad = (a: Vec3) => {
    let s = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += a[i] * grr[i * 3 + j] * a[j];
    return Math.max(0, s);
  };
  const rhoHat: Vec3 = [rho[0] / d, rho[1] / d, rho[2] / d];
  const u2 = u[0] * u[0] + u[1] * u[1] + u[2] * u[2];
  const timeSigmaS = u2 > 0 ? Math.sqrt(quad(u)) / u2 : 0;
  const eig = jacobiEigenSymmetric(Float64Array.from(grr), 3);
  const lamMax = Math.max(...Array.from(eig.values));
  return {
    body: best.body,
    closeApproachTdbDays: best.tdbDays,
    closeApproachUtc: utcFromTdbDays(best.tdbDays).utc,
    distanceKm: best.distanceKm,
    distanceSigmaKm: Math.sqrt(quad(rhoHat)),
    positionSigmaMaxKm: Math.sqrt(Math.max(0, lamMax)),
    timeSigmaMin: timeSigmaS / 60,
  };
}
