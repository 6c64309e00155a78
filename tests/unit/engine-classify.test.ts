import { describe, expect, it } from 'vitest';
import { classifyOrbit, eccentricityGradient, eccentricityOf } from '../../server/engine/classify';
import { AU_KM, DAY_S, GM_AU3_D2 } from '../../server/engine/constants';
import { elementsToState } from '../../server/engine/twobody';
import type { Vec3 } from '../../server/engine/vec';

const MU = GM_AU3_D2.sun;

/** Deterministic normal samples (mulberry32 + Box–Muller) so the Monte Carlo check is reproducible. */
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

describe('classifyOrbit (issue 3 item 6; METHODS §3.5)', () => {
  it('METHODS §3.5 computed example: 1/a = −1e-4 /AU gives v∞ = 0.30 km/s', () => {
    // r = 1 AU, v² = μ(2/r − 1/a)
    const v = Math.sqrt(MU * (2 + 1e-4));
    const c = classifyOrbit({ positionAu: [1, 0, 0], velocityAuD: [0, v, 0] });
    expect(c.inverseSemiMajorAxisPerAu).toBeCloseTo(-1e-4, 12);
    expect(Math.abs(c.vInfinityKmS! - 0.3)).toBeLessThan(0.005);
    // and equal to vis-viva √(v² − 2μ/r) (METHODS §3.5)
    expect(c.vInfinityKmS!).toBeCloseTo((Math.sqrt(v * v - 2 * MU) * AU_KM) / DAY_S, 9);
    expect(c.bound).toBe(false);
    expect(c.perihelionAu).toBeCloseTo(1, 12);
    expect(c.eccentricitySigma).toBeNull();
    expect(c.unboundSignificance).toBeNull();
  });

  it("reference cases (METHODS §3.5, values recalled there): 1I e≈1.20 -> v∞≈26 km/s, 2I e≈3.36 -> v∞≈32 km/s", () => {
    // perihelion distances recalled from memory: 1I q ≈ 0.255 AU, 2I q ≈ 2.007 AU
    for (const [q, e, vinf] of [
      [0.255, 1.2, 26],
      [2.007, 3.36, 32],
    ]) {
      const s = elementsToState({ q, e, i: 2, node: 0.5, argPeri: 1, trueAnomaly: 0.3 }, MU);
      const c = classifyOrbit({ positionAu: s.r, velocityAuD: s.v });
      expect(c.eccentricity).toBeCloseTo(e, 10);
      expect(c.perihelionAu).toBeCloseTo(q, 10);
      expect(Math.abs(c.vInfinityKmS! - vinf)).toBeLessThan(1);
    }
  });

  it('bound orbit: v∞ null, bound true, significance negative', () => {
    const s = elementsToState({ q: 1, e: 0.5, i: 0.1, node: 0, argPeri: 0, trueAnomaly: 1 }, MU);
    const cov = [...Array(6)].map((_, i) => [...Array(6)].map((_, j) => (i === j ? (i < 3 ? 1e-12 : 1e-16) : 0)));
    const c = classifyOrbit({ positionAu: s.r, velocityAuD: s.v, covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'], matrix: cov } });
    expect(c.bound).toBe(true);
    expect(c.vInfinityKmS).toBeNull();
    expect(c.unboundSignificance!).toBeLessThan(0);
    expect(c.unboundSignificance!).toBeCloseTo(-0.5 / c.eccentricitySigma!, 6);
  });

  it('central-difference gradient of e matches an independent one-sided estimate with a different step', () => {
    const s = elementsToState({ q: 0.8, e: 1.05, i: 0.7, node: 1, argPeri: 2, trueAnomaly: -0.4 }, MU);
    const g = eccentricityGradient(s.r, s.v, MU);
    const base = eccentricityOf(s.r, s.v, MU);
    const st = [...s.r, ...s.v];
    for (let k = 0; k < 6; k++) {
      const h = (k < 3 ? 1e-8 : 1e-10);
      const p = [...st];
      p[k] += h;
      const fwd = (eccentricityOf(p.slice(0, 3) as Vec3, p.slice(3) as Vec3, MU) - base) / h;
      expect(Math.abs(fwd - g[k])).toBeLessThan(1e-5 * Math.max(1, Math.abs(g[k])));
    }
  });

  it('σ_e from linear propagation agrees with Monte Carlo sampling of the covariance (small covariance)', () => {
    const s = elementsToState({ q: 1.5, e: 1.002, i: 1.1, node: 0.3, argPeri: 4, trueAnomaly: -0.8 }, MU);
    // correlated covariance Γ = L Lᵀ (AU, AU/d), with a non-grav row that must be ignored
    const L = [
      [1e-6, 0, 0, 0, 0, 0],
      [3e-7, 8e-7, 0, 0, 0, 0],
      [-2e-7, 1e-7, 6e-7, 0, 0, 0],
      [1e-9, 2e-10, 0, 3e-9, 0, 0],
      [-5e-10, 1e-9, 3e-10, 2e-10, 2e-9, 0],
      [0, -2e-10, 6e-10, 1e-10, 3e-10, 1.5e-9],
    ];
    const G = L.map((ri) => L.map((rj) => ri.reduce((acc, x, k) => acc + x * rj[k], 0)));
    const withNg = [...G.map((row) => [...row, 0]), [0, 0, 0, 0, 0, 0, 1e-28]];
    const c = classifyOrbit({
      positionAu: s.r,
      velocityAuD: s.v,
      covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2'], matrix: withNg },
    });
    const n = normals(12345);
    const N = 20000;
    let sum = 0;
    let sum2 = 0;
    for (let k = 0; k < N; k++) {
      const z = [n(), n(), n(), n(), n(), n()];
      const d = L.map((row) => row.reduce((acc, x, j) => acc + x * z[j], 0));
      const e = eccentricityOf(
        [s.r[0] + d[0], s.r[1] + d[1], s.r[2] + d[2]],
        [s.v[0] + d[3], s.v[1] + d[4], s.v[2] + d[5]],
        MU,
      );
      sum += e;
      sum2 += e * e;
    }
    const mean = sum / N;
    const sd = Math.sqrt(sum2 / N - mean * mean);
    // the sample standard deviation of N normals has relative standard error ≈ 1/√(2N) = 0.5 %; allow 3 %
    expect(Math.abs(sd / c.eccentricitySigma! - 1)).toBeLessThan(0.03);
    expect(c.unboundSignificance!).toBeCloseTo((c.eccentricity - 1) / c.eccentricitySigma!, 12);
    // σ scales with the square root of the covariance
    const c4 = classifyOrbit({ positionAu: s.r, velocityAuD: s.v, covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'], matrix: G.map((r) => r.map((x) => 4 * x)) } });
    expect(c4.eccentricitySigma! / c.eccentricitySigma!).toBeCloseTo(2, 9);
  });

  it('refuses a covariance without the six state rows', () => {
    expect(() =>
      classifyOrbit({ positionAu: [1, 0, 0], velocityAuD: [0, 0.02, 0], covariance: { parameters: ['q', 'e'], matrix: [[1, 0], [0, 1]] } }),
    ).toThrow(/x, y, z, vx, vy, vz/);
  });
});
