/**
 * Osculating heliocentric elements of a normalised orbit solution, with 1-sigma uncertainties, for the
 * solution pages and the version comparison. Pure functions over engine primitives (no database).
 *
 * Method (linear covariance mapping, the usual first-order practice):
 *   state s = (x, y, z, vx, vy, vz), heliocentric ICRF, AU and AU/d, at the solution epoch
 *   elements E = (q, e, i, Ω, ω, tp) in the J2000 ecliptic (IAU 1976 obliquity; the convention of the JSON input),
 *     from the engine's stateToElements with GM_sun
 *   J = ∂E/∂s by CENTRAL FINITE DIFFERENCES, step 1e-7·|r| for positions and 1e-7·|v| for velocities
 *     (angle differences wrapped to (−π, π]); truncation error O(h²), far below the σ shown
 *   C_E = J C_s Jᵀ (state block of the covariance), σ_k = √(C_E)kk
 *   Non-gravitational A1..A3 σ are read from the diagonal of the covariance rows a1..a3 (no mapping needed).
 *   Unbound significance S = (e − 1)/σ_e; v∞ = √(GM (e − 1)/q) for e > 1 (the engine's unboundTest, classify.ts).
 * Angles and their σ are reported in degrees, tp in TDB days since J2000 with σ in days.
 */
import type { NormalizedOrbit } from '../../shared/schemas/orbit';
import type { ClassificationSummary } from '../../shared/schemas/objects';
import { centralDifferenceJacobian, propagatedSigma, unboundTest } from '../engine/classify';
import { GM_AU3_D2 } from '../engine/constants';
import { equatorialToEcliptic } from '../engine/frames';
import { stateToElements } from '../engine/twobody/elements';
import type { Vec3 } from '../engine/vec';

const RAD = 180 / Math.PI;
const STATE_NAMES = ['x', 'y', 'z', 'vx', 'vy', 'vz'] as const;

export const ELEMENT_KEYS = ['q', 'e', 'i', 'node', 'argPeri', 'tp'] as const;
export type ElementKey = (typeof ELEMENT_KEYS)[number];
export const ELEMENT_INFO: Record<ElementKey, { label: string; unit: string; angle: boolean }> = {
  q: { label: 'Perihelion distance q', unit: 'AU', angle: false },
  e: { label: 'Eccentricity e', unit: '', angle: false },
  i: { label: 'Inclination i', unit: 'deg', angle: true },
  node: { label: 'Ascending node Ω', unit: 'deg', angle: true },
  argPeri: { label: 'Argument of perihelion ω', unit: 'deg', angle: true },
  tp: { label: 'Time of perihelion tp', unit: 'TDB d since J2000', angle: false },
};

export const ELEMENTS_METHOD =
  'Osculating heliocentric elements (J2000 ecliptic) at each solution epoch; 1-sigma from the state covariance ' +
  'mapped by the Jacobian ∂(elements)/∂(state) (central differences), C_E = J C Jᵀ; linear approximation.';

export interface ElementWithSigma {
  value: number;
  sigma: number | null;
}

function elementVector(r: Vec3, v: Vec3, epochTdbDays: number): number[] {
  const el = stateToElements(equatorialToEcliptic(r), equatorialToEcliptic(v), GM_AU3_D2.sun, epochTdbDays);
  return [el.q, el.e, el.i, el.node, el.argPeri, el.tp];
}

function wrapAngle(x: number): number {
  const t = ((x + Math.PI) % (2 * Math.PI) + 2 * Math.PI) % (2 * Math.PI);
  return t - Math.PI;
}

/** ∂E/∂s, 6×6, rows ELEMENT_KEYS, columns x..vz (radians for the angles). */
export function elementJacobian(r: Vec3, v: Vec3, epochTdbDays: number): number[][] {
  return centralDifferenceJacobian(
    (rr, vv) => elementVector(rr, vv, epochTdbDays),
    r,
    v,
    1e-7 * Math.hypot(...r),
    1e-7 * Math.hypot(...v),
    (m, plus, minus) => (ELEMENT_INFO[ELEMENT_KEYS[m]].angle ? wrapAngle(plus - minus) : plus - minus),
  );
}

/** The 6×6 state block of the covariance, or null when there is none. */
function stateCovariance(orbit: NormalizedOrbit): number[][] | null {
  const cov = orbit.covariance;
  if (!cov) return null;
  const ix = STATE_NAMES.map((n) => cov.parameters.indexOf(n));
  if (ix.some((i) => i < 0)) return null;
  return ix.map((i) => ix.map((j) => cov.matrix[i][j]));
}

/** Elements with 1σ (angles in degrees). */
export function elementsWithSigma(orbit: NormalizedOrbit): Record<ElementKey, ElementWithSigma> {
  const r = orbit.positionAu as Vec3;
  const v = orbit.velocityAuD as Vec3;
  const values = elementVector(r, v, orbit.epochTdbDays);
  const C = stateCovariance(orbit);
  let sig: (number | null)[] = values.map(() => null);
  if (C) {
    const J = elementJacobian(r, v, orbit.epochTdbDays);
    sig = J.map((row) => propagatedSigma(row, C));
  }
  const out = {} as Record<ElementKey, ElementWithSigma>;
  ELEMENT_KEYS.forEach((key, m) => {
    const k = ELEMENT_INFO[key].angle ? RAD : 1;
    out[key] = { value: values[m] * k, sigma: sig[m] === null ? null : sig[m]! * k };
  });
  return out;
}

/** A1..A3 with 1σ from the covariance (AU/d²); value null when the solution has no non-grav model. */
export function nonGravWithSigma(orbit: NormalizedOrbit): Record<'a1' | 'a2' | 'a3', { value: number | null; sigma: number | null }> {
  const cov = orbit.covariance;
  const sigmaOf = (name: 'a1' | 'a2' | 'a3') => {
    const i = cov ? cov.parameters.indexOf(name) : -1;
    return i >= 0 ? Math.sqrt(Math.max(0, cov!.matrix[i][i])) : null;
  };
  return {
    a1: { value: orbit.nonGrav ? orbit.nonGrav.a1 : null, sigma: sigmaOf('a1') },
    a2: { value: orbit.nonGrav ? orbit.nonGrav.a2 : null, sigma: sigmaOf('a2') },
    a3: { value: orbit.nonGrav ? orbit.nonGrav.a3 : null, sigma: sigmaOf('a3') },
  };
}

/** The non-gravitational terms of the force model: those non-zero or estimated (in the covariance). */
export function nonGravTerms(orbit: NormalizedOrbit): ('A1' | 'A2' | 'A3')[] {
  if (!orbit.nonGrav) return [];
  const params = orbit.covariance?.parameters ?? [];
  return (['a1', 'a2', 'a3'] as const)
    .filter((n) => orbit.nonGrav![n] !== 0 || params.includes(n))
    .map((n) => n.toUpperCase() as 'A1' | 'A2' | 'A3');
}

/** Bound / unbound summary of the osculating heliocentric orbit at the epoch. */
export function classifySolution(orbit: NormalizedOrbit): ClassificationSummary {
  const el = elementsWithSigma(orbit);
  const e = el.e.value;
  const q = el.q.value;
  const sigma = el.e.sigma;
  const { unboundSignificance, bound, vInfinityKmS } = unboundTest(e, sigma, q, GM_AU3_D2.sun);
  return {
    eccentricity: e,
    eccentricitySigma: sigma,
    unboundSignificance,
    bound,
    perihelionAu: q,
    vInfinityKmS,
    method:
      'osculating heliocentric orbit at the epoch (GM_sun); σ_e by linear mapping of the state covariance ' +
      '(central-difference Jacobian); S = (e − 1)/σ_e. An interstellar claim needs the original barycentric orbit.',
  };
}
