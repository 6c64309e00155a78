/**
 * Importance sampling (server/engine/assess/importanceSampling.ts) on cases with a known answer.
 * References:
 *  - bivariate normal density, closed form with the correlation rho (common practice, no source);
 *  - half-space tail of a Gaussian: P(a.(x - m) >= beta sigma_a) = Phi(-beta) exactly; Phi(-4.753424) = 1.000e-6
 *    (standard normal table value, recalled from memory);
 *  - capture disk on a linear b-plane map: the linear IP of risk/linear-ip (principal axes + erfc + adaptive
 *    Gauss-Legendre; tested on its own in risk-linear-ip.test.ts), an independent computation of the same integral;
 *  - the design point of a trace passing `c` minor sigmas outside the disk, `a` major sigmas from the nominal:
 *    |u_d| ~ sqrt(a^2 + c^2) (a straight edge; the disk's curvature changes it by ~ a / (c kappa), negligible here;
 *    common practice, no source);
 *  - the importance-sampling identity E_p[h] = E_q[h p / q] (common practice, no source; e.g. Robert & Casella,
 *    Monte Carlo Statistical Methods, ch. 3, recalled from memory): agreement within 3 standard errors.
 * Plain Monte Carlo's standard error at the same N is sqrt(p (1 - p) / N); the IS one must be far below it.
 */
import { describe, expect, it } from 'vitest';
import {
  allocateMixture,
  diskDesignPointGaussian,
  gaussian,
  gaussianLogDensity,
  importanceEstimate,
  importanceSample,
  mixtureLogDensity,
} from '../../server/engine/assess/importanceSampling';
import { linearImpactProbability, normalPdf, normalSurvival, principalAxes2, RandomStream } from '../../server/engine/risk';

describe('densities and the estimator on hand-made numbers', () => {
  it('log-density of a correlated 2-D Gaussian equals the closed-form bivariate normal', () => {
    const s1 = 2, s2 = 0.5, rho = -0.7;
    const g = gaussian([1, -1], [s1 * s1, rho * s1 * s2, rho * s1 * s2, s2 * s2]);
    for (const [x, y] of [[1, -1], [3.2, -1.4], [-2, 0.3]]) {
      const dx = (x - 1) / s1, dy = (y + 1) / s2;
      const q = (dx * dx - 2 * rho * dx * dy + dy * dy) / (1 - rho * rho);
      const pdf = Math.exp(-q / 2) / (2 * Math.PI * s1 * s2 * Math.sqrt(1 - rho * rho));
      expect(gaussianLogDensity(g, [x, y])).toBeCloseTo(Math.log(pdf), 12);
    }
  });

  it('mixture log-density is the log of the weighted sum of the component densities', () => {
    const a = gaussian([0], [1]), b = gaussian([3], [0.25]);
    for (const x of [-1, 0.5, 2.9, 40]) {
      const direct = 0.3 * normalPdf(x) + 0.7 * (normalPdf((x - 3) / 0.5) / 0.5);
      const got = mixtureLogDensity([{ weight: 3, gaussian: a }, { weight: 7, gaussian: b }], [x]);
      // x = 40: both densities underflow (e^-800, e^-2738); the first dominates, log-sum-exp keeps it
      if (x === 40) expect(got).toBeCloseTo(Math.log(0.3) - 0.5 * 40 * 40 - 0.5 * Math.log(2 * Math.PI), 8);
      else expect(got).toBeCloseTo(Math.log(direct), 12);
    }
  });

  it('equal weights give plain Monte Carlo: estimate hits/N, s.e. s/sqrt(N); strata sum their variances', () => {
    const hit = [1, 0, 0, 1, 0, 1, 0, 0, 0, 0];
    const e = importanceEstimate(new Float64Array(10), hit);
    expect(e.estimate).toBeCloseTo(0.3, 15);
    // sample variance of three ones and seven zeros: (3 - 0.9) / 9
    expect(e.standardError).toBeCloseTo(Math.sqrt((2.1 / 9) / 10), 15);
    expect(e.ess).toBeCloseTo(3, 12);
    expect(e.hits).toBe(3);
    // two strata of 5: values (1,0,0,1,0) and (1,0,0,0,0) -> s^2 = 0.3 and 0.2; s.e. = sqrt(5*0.3 + 5*0.2)/10
    const s = importanceEstimate(new Float64Array(10), hit, [0, 0, 0, 0, 0, 1, 1, 1, 1, 1]);
    expect(s.estimate).toBeCloseTo(0.3, 15);
    expect(s.standardError).toBeCloseTo(Math.sqrt(5 * 0.3 + 5 * 0.2) / 10, 15);
    // weights: values w*hit = (e^1, e^-1) for two hits of 4
    const w = importanceEstimate([1, 0, -1, 0], [1, 0, 1, 0]);
    expect(w.estimate).toBeCloseTo((Math.E + 1 / Math.E) / 4, 14);
    expect(w.ess).toBeCloseTo((Math.E + 1 / Math.E) ** 2 / (Math.E ** 2 + Math.E ** -2), 12);
  });

  it('deterministic mixture allocation sums to N, follows the weights, gives every component a clone', () => {
    expect(allocateMixture([{ weight: 1 }, { weight: 2 }, { weight: 1 }], 10)).toEqual([3, 5, 2]);
    expect(allocateMixture([{ weight: 0.5 }, { weight: 0.5 }], 1025).reduce((a, b) => a + b)).toBe(1025);
    expect(allocateMixture([{ weight: 1e-9 }, { weight: 1 }], 10)).toEqual([1, 9]);
    expect(() => allocateMixture([{ weight: 1 }, { weight: 0 }], 10)).toThrow(/positive/);
  });
});

/** A fixed random 6-D covariance: G = A A^T / 6 + 0.1 I plus an elongated direction of variance `long`. */
function covariance6(seed: number, long: number): { cov: Float64Array; dir: number[] } {
  const rs = RandomStream.forClone(seed, 0);
  const A = Array.from({ length: 36 }, () => rs.normal());
  const dir = Array.from({ length: 6 }, () => rs.normal());
  const dn = Math.hypot(...dir);
  for (let i = 0; i < 6; i++) dir[i] /= dn;
  const cov = new Float64Array(36);
  for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) {
    let s = 0;
    for (let k = 0; k < 6; k++) s += A[i * 6 + k] * A[j * 6 + k];
    cov[i * 6 + j] = s / 6 + (i === j ? 0.1 : 0) + long * dir[i] * dir[j];
  }
  return { cov, dir };
}

describe('importance sampling on known tails', () => {
  it('6-D half-space tail of probability 1e-6: within 3 s.e. of Phi(-beta), s.e. 100x below plain Monte Carlo', () => {
    const beta = 4.753424;
    expect(normalSurvival(beta) / 1e-6 - 1).toBeLessThan(1e-5); // table value, recalled from memory
    const { cov } = covariance6(11, 0);
    const mean = [0.3, -1, 2, 0, 0.5, 1];
    const a = [0.2, -1, 0.4, 0.9, 0, -0.3];
    let sa2 = 0;
    const ga = new Float64Array(6);
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) ga[i] += cov[i * 6 + j] * a[j];
    for (let i = 0; i < 6; i++) sa2 += a[i] * ga[i];
    const sa = Math.sqrt(sa2);
    // design point of the half-space: m + beta Gamma a / sigma_a
    const target = gaussian(mean, cov);
    const q = gaussian(mean.map((m, i) => m + (beta * ga[i]) / sa), cov);
    const hit = (x: Float64Array) => a.reduce((s, ai, i) => s + ai * (x[i] - mean[i]), 0) >= beta * sa;
    // relative s.e. per clone of this shifted proposal: sqrt(e^(beta^2) Phi(-2 beta) / Phi(-beta)^2 - 1) = 2.4
    // (closed form of the second moment of the weight over the half-space), so 4000 clones give ~3.8%
    const r = importanceSample(target, [{ weight: 1, gaussian: q }], 4000, 5, hit);
    const exact = normalSurvival(beta);
    console.log(`half-space: IS ${r.estimate.toExponential(4)} +- ${r.standardError.toExponential(2)} (${r.hits} hits / 4000, ESS ${r.ess.toFixed(0)}), exact ${exact.toExponential(4)}, plain MC s.e. ${r.plainStandardError.toExponential(2)}`);
    expect(r.hits).toBeGreaterThan(1000);
    expect(Math.abs(r.estimate - exact)).toBeLessThan(3 * r.standardError);
    expect(r.relativeError).toBeLessThan(0.05);
    expect(r.standardError).toBeLessThan(r.plainStandardError / 100);
  });

  it('6-D Gaussian, linear b-plane map, trace 3 minor sigmas outside the disk at 1.2 major sigmas: matches the linear IP', () => {
    const { cov } = covariance6(23, 1e6); // one direction 1000x longer: b-plane axis ratio ~ 1000
    const rs = RandomStream.forClone(23, 1);
    const bj = Float64Array.from({ length: 12 }, () => rs.normal());
    const gb = [[0, 0], [0, 0]];
    for (let r = 0; r < 2; r++) for (let s = 0; s < 2; s++) for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) gb[r][s] += bj[r * 6 + i] * cov[i * 6 + j] * bj[s * 6 + j];
    const ax = principalAxes2(gb);
    const w = [Math.cos(ax.angleRad), Math.sin(ax.angleRad)], m = [-w[1], w[0]];
    const R = 0.6 * ax.sigmaMajor;
    const along = 1.2, cross = 3;
    const bBar: [number, number] = [0, 1].map((k) => along * ax.sigmaMajor * w[k] + (R + cross * ax.sigmaMinor) * m[k]) as [number, number];
    const exact = linearImpactProbability({ meanKm: bBar, covarianceKm2: gb }, R).probability;
    expect(ax.sigmaMajor / ax.sigmaMinor).toBeGreaterThan(300);
    expect(exact).toBeGreaterThan(1e-7);
    expect(exact).toBeLessThan(1e-4);

    const mean = [1, 2, 3, 4, 5, 6];
    const zero = new Float64Array(6);
    const exactLin = diskDesignPointGaussian({ covariance: cov, n: 6, pointDelta: zero, bPlaneKm: bBar, bJacobian: bj, captureRadiusKm: R });
    expect(Math.abs(exactLin.beta - Math.hypot(along, cross))).toBeLessThan(0.01);
    // a second component from a wrong linearisation (nominal image 1 minor sigma further out): the mixture stays unbiased
    const off: [number, number] = [bBar[0] + ax.sigmaMinor * m[0], bBar[1] + ax.sigmaMinor * m[1]];
    const wrongLin = diskDesignPointGaussian({ covariance: cov, n: 6, pointDelta: zero, bPlaneKm: off, bJacobian: bj, captureRadiusKm: R });
    expect(wrongLin.beta).toBeGreaterThan(exactLin.beta + 0.5);
    const comp = (p: typeof exactLin) => ({ weight: 0.5, gaussian: gaussian(mean.map((x, i) => x + p.meanDelta[i]), p.covariance) });
    const target = gaussian(mean, cov);
    const hit = (x: Float64Array) => {
      let xi = bBar[0], zeta = bBar[1];
      for (let i = 0; i < 6; i++) {
        xi += bj[i] * (x[i] - mean[i]);
        zeta += bj[6 + i] * (x[i] - mean[i]);
      }
      return Math.hypot(xi, zeta) <= R;
    };
    const r = importanceSample(target, [comp(exactLin), comp(wrongLin)], 4000, 9, hit);
    console.log(`disk: IS ${r.estimate.toExponential(4)} +- ${r.standardError.toExponential(2)} (${r.hits} hits / 4000, ESS ${r.ess.toFixed(0)}), linear IP ${exact.toExponential(4)}, plain MC s.e. ${r.plainStandardError.toExponential(2)}`);
    expect(Math.abs(r.estimate - exact)).toBeLessThan(3 * r.standardError);
    expect(r.relativeError).toBeLessThan(0.1);
    expect(r.standardError).toBeLessThan(r.plainStandardError / 30);
  });

  it('refuses a proposal when the linearised nominal is inside the disk (no tail)', () => {
    const { cov } = covariance6(3, 0);
    const bj = Float64Array.from({ length: 12 }, (_, i) => (i % 7) - 3);
    expect(() => diskDesignPointGaussian({ covariance: cov, n: 6, pointDelta: new Float64Array(6), bPlaneKm: [1, 1], bJacobian: bj, captureRadiusKm: 5 })).toThrow(/inside the disk/);
  });
});
