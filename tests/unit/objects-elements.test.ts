// Element 1-sigma of orbit solutions (server/services/orbitElements.ts), checked independently:
// - against Monte Carlo: for a Gaussian state with covariance C and a map E(s) that is linear over the spread,
//   the sample standard deviation of E equals √(J C Jᵀ)kk (linear covariance propagation, common practice, no source);
//   20 000 draws give the sample σ to about 1/√(2N) ≈ 0.5 %, so 3 % is a safe bound that a wrong Jacobian fails;
// - v∞ of a hyperbola with q = 1 AU, e = 2: v∞ = √(GM (e − 1)/q) = √GM, and √GM_sun in AU³/d² is the Gaussian
//   gravitational constant k = 0.01720209895 AU/d (IAU 1976 System of Astronomical Constants), i.e. 29.78 km/s.
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { equatorialToEcliptic } from '../../server/engine/frames';
import { GM_AU3_D2 } from '../../server/engine/constants';
import { stateToElements } from '../../server/engine/twobody/elements';
import { classifySolution, elementsWithSigma, nonGravTerms } from '../../server/services/orbitElements';
import type { NormalizedOrbit } from '../../shared/schemas/orbit';

const nea = loadOrbitSolution(fs.readFileSync('server/db/demo/hso-26-n4.opm', 'utf8'));
const comet = loadOrbitSolution(fs.readFileSync('server/db/demo/hso-23-c2.json', 'utf8'));
const visitor2 = loadOrbitSolution(fs.readFileSync('server/db/demo/hso-26-u1.v2.json', 'utf8'));

function cholesky(a: number[][]): number[][] {
  const n = a.length;
  const l = a.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      l[i][j] = i === j ? Math.sqrt(s) : s / l[j][j];
    }
  }
  return l;
}

/** mulberry32 and Box–Muller: a small seeded normal generator (independent of the engine's). */
function normals(seed: number) {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(u() + 1e-300)) * Math.cos(2 * Math.PI * u());
}

function monteCarloSigmas(orbit: NormalizedOrbit, n: number): number[] {
  const C = orbit.covariance!.matrix.slice(0, 6).map((r) => r.slice(0, 6));
  const L = cholesky(C);
  const z = normals(20261202);
  const s0 = [...orbit.positionAu, ...orbit.velocityAuD];
  const sum = new Array<number>(6).fill(0);
  const sum2 = new Array<number>(6).fill(0);
  const nominal = stateToElements(equatorialToEcliptic(orbit.positionAu as never), equatorialToEcliptic(orbit.velocityAuD as never), GM_AU3_D2.sun, orbit.epochTdbDays);
  const nom = [nominal.q, nominal.e, nominal.i, nominal.node, nominal.argPeri, nominal.tp];
  for (let k = 0; k < n; k++) {
    const w = [z(), z(), z(), z(), z(), z()];
    const s = s0.map((v, i) => v + L[i].reduce((acc, l, j) => acc + l * w[j], 0));
    const el = stateToElements(equatorialToEcliptic([s[0], s[1], s[2]]), equatorialToEcliptic([s[3], s[4], s[5]]), GM_AU3_D2.sun, orbit.epochTdbDays);
    const v = [el.q, el.e, el.i, el.node, el.argPeri, el.tp];
    for (let m = 0; m < 6; m++) {
      let d = v[m] - nom[m];
      if (m >= 2 && m <= 4) d = Math.atan2(Math.sin(d), Math.cos(d)); // angles: difference on the circle
      sum[m] += d;
      sum2[m] += d * d;
    }
  }
  return sum.map((s, m) => Math.sqrt(sum2[m] / n - (s / n) ** 2));
}

describe('element 1-sigma by the Jacobian', () => {
  it.each([
    ['near-Earth asteroid (OPM, Cartesian covariance)', nea],
    ['comet (JSON, element covariance with non-grav rows)', comet],
  ])('agrees with Monte Carlo sampling of the state for the %s', (_name, orbit) => {
    const lin = elementsWithSigma(orbit);
    const mc = monteCarloSigmas(orbit, 20_000);
    const deg = 180 / Math.PI;
    const linear = [lin.q.sigma!, lin.e.sigma!, lin.i.sigma! / deg, lin.node.sigma! / deg, lin.argPeri.sigma! / deg, lin.tp.sigma!];
    linear.forEach((s, m) => expect(s / mc[m], `element ${m}: linear ${s}, Monte Carlo ${mc[m]}`).toBeGreaterThan(0.97));
    linear.forEach((s, m) => expect(s / mc[m], `element ${m}: linear ${s}, Monte Carlo ${mc[m]}`).toBeLessThan(1.03));
  });

  it('gives no sigma without a covariance, and the same values', () => {
    const bare = { ...nea, covariance: null };
    const a = elementsWithSigma(bare);
    const b = elementsWithSigma(nea);
    for (const k of ['q', 'e', 'i', 'node', 'argPeri', 'tp'] as const) {
      expect(a[k].sigma).toBeNull();
      expect(a[k].value).toBe(b[k].value);
    }
  });
});

describe('classification summary', () => {
  it('v∞ of a q = 1 AU, e = 2 hyperbola is the Gaussian constant k in AU/d (29.78 km/s)', () => {
    // perihelion on the ecliptic x axis, moving along +y: v_p = √(GM (1 + e)/q)
    const vp = Math.sqrt(GM_AU3_D2.sun * 3);
    const eq = (v: [number, number, number]) => {
      // ecliptic -> equatorial (inverse of equatorialToEcliptic, checked by round trip below)
      const eps = (84381.448 / 3600) * (Math.PI / 180);
      return [v[0], v[1] * Math.cos(eps) - v[2] * Math.sin(eps), v[1] * Math.sin(eps) + v[2] * Math.cos(eps)] as [number, number, number];
    };
    const orbit = { ...nea, positionAu: eq([1, 0, 0]), velocityAuD: eq([0, vp, 0]), covariance: null, nonGrav: null };
    expect(equatorialToEcliptic(orbit.positionAu)[1]).toBeCloseTo(0, 14);
    const c = classifySolution(orbit);
    expect(c.eccentricity).toBeCloseTo(2, 12);
    expect(c.perihelionAu).toBeCloseTo(1, 12);
    expect(c.bound).toBe(false);
    expect(c.unboundSignificance).toBeNull();
    const kAuD = 0.01720209895;
    expect(c.vInfinityKmS! / ((kAuD * 149_597_870.7) / 86_400)).toBeCloseTo(1, 8);
  });

  it('names the non-grav terms that are non-zero or estimated', () => {
    expect(nonGravTerms(nea)).toEqual([]);
    expect(nonGravTerms(comet)).toEqual(['A1', 'A2', 'A3']);
    expect(nonGravTerms(visitor2)).toEqual(['A1', 'A2']); // A3 = 0 and not in the covariance
  });
});
