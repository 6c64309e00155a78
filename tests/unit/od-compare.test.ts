import { describe, expect, it } from 'vitest';
import type { FitResult, Residual } from '../../shared/schemas/od';
import { fitComparisonSchema } from '../../shared/schemas/od';
import { compareFits, residualTrend } from '../../server/engine/od/compare';
import {
  chiSquareCdf,
  chiSquareSurvival,
  kolmogorovSmirnov,
  logChiSquareSurvival,
  sigmaFromLogPValue,
  sigmaFromPValue,
} from '../../server/engine/od/statistics';
import { RandomStream } from '../../server/engine/risk/random';

describe('chi-square survival function (regularised incomplete gamma; Numerical Recipes §6.2)', () => {
  it('matches the 5 % and 1 % critical values of standard chi-square tables (values recalled from memory)', () => {
    // Critical values of chi² tables (e.g. Abramowitz & Stegun Table 26.8), recalled from memory.
    const table: [number, number, number][] = [
      [1, 3.841, 0.05],
      [2, 5.991, 0.05],
      [3, 7.815, 0.05],
      [6, 12.592, 0.05],
      [6, 16.812, 0.01],
      [10, 18.307, 0.05],
      [30, 43.773, 0.05],
    ];
    for (const [k, x, p] of table) expect(chiSquareSurvival(x, k)).toBeCloseTo(p, 4);
  });

  it('equals the closed forms: k = 2 gives exp(−x/2); k = 1 gives erfc(√(x/2)) (standard identities, no source)', () => {
    for (const x of [0.1, 1, 4, 20, 100]) {
      expect(chiSquareSurvival(x, 2)).toBeCloseTo(Math.exp(-x / 2), 14);
      expect(chiSquareCdf(x, 2) + chiSquareSurvival(x, 2)).toBeCloseTo(1, 14);
    }
    // k = 1: P(chi²_1 >= s²) is the two-sided Gaussian tail at s, so the significance is exactly s, even far out
    for (const s of [1, 2, 3, 5, 10, 30, 44.7]) {
      expect(sigmaFromLogPValue(logChiSquareSurvival(s * s, 1))).toBeCloseTo(s, 6);
    }
  });

  it('two-sided sigma of the familiar p-values (normal table values; common practice)', () => {
    expect(sigmaFromPValue(0.3173105)).toBeCloseTo(1, 5);
    expect(sigmaFromPValue(0.0455003)).toBeCloseTo(2, 5);
    expect(sigmaFromPValue(0.0026998)).toBeCloseTo(3, 4);
    expect(sigmaFromPValue(1)).toBe(0);
  });

  it('Kolmogorov–Smirnov accepts a true chi² sample and rejects a scaled one', () => {
    const rs = RandomStream.forClone(7, 0);
    const sample = Array.from({ length: 400 }, () => {
      let s = 0;
      for (let k = 0; k < 6; k++) s += rs.normal() ** 2;
      return s;
    });
    expect(kolmogorovSmirnov(sample, (x) => chiSquareCdf(x, 6)).pValue).toBeGreaterThan(0.01);
    expect(kolmogorovSmirnov(sample.map((x) => 1.5 * x), (x) => chiSquareCdf(x, 6)).pValue).toBeLessThan(1e-4);
  });
});

function residual(i: number, t: number, ra: number, dec: number): Residual {
  return { index: i, line: i + 1, stn: 'HSA', obsTime: '2030-01-01T00:00:00Z', obsTimeTdbDays: t, raCosDecArcsec: ra, decArcsec: dec, sigmaRaArcsec: 0.5, sigmaDecArcsec: 0.5, chiSquare: 0, status: 'used' };
}

describe('residual trend (quadratic in time, F-test; compare.ts)', () => {
  const rs = RandomStream.forClone(11, 0);
  const times = Array.from({ length: 120 }, (_, i) => 1000 + i * 1.5);
  it('white residuals show no significant trend; a quadratic signal of 2 sigma amplitude does', () => {
    const flat = times.map((t, i) => residual(i, t, 0.5 * rs.normal(), 0.5 * rs.normal()));
    const trendFree = residualTrend({ residuals: flat });
    expect(trendFree.sigma).toBeLessThan(3);
    const curved = times.map((t, i) => {
      const x = (t - 1090) / 90;
      return residual(i, t, 0.5 * rs.normal() + 1.0 * x * x, 0.5 * rs.normal() - 0.5 * x);
    });
    expect(residualTrend({ residuals: curved }).sigma).toBeGreaterThan(6);
  });
});

function fakeFit(label: FitResult['label'], chi2PerObs: number, n: number, extra: Partial<FitResult> = {}): FitResult {
  const residuals = Array.from({ length: 40 }, (_, i) => residual(i, 1000 + i, 0.1 * Math.sin(i), 0.1 * Math.cos(i)));
  const el = (v: number, s: number) => ({ value: v, sigma: s });
  return {
    label,
    status: 'converged',
    message: null,
    epochTdbDays: 1020,
    epochTdbJd: 2452565,
    positionAu: [1, 0, 0],
    velocityAuD: [0, 0.017, 0],
    nonGrav: null,
    parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'],
    covariance: null,
    rmsNormalized: Math.sqrt(chi2PerObs / 2),
    rmsArcsec: 0.3,
    chiSquare: 40 * chi2PerObs,
    observationsUsed: 40,
    observationsTotal: 40,
    degreesOfFreedom: 80 - n,
    iterations: [],
    residuals,
    elements: {
      perihelionDistanceAu: el(1, 1e-6), eccentricity: el(0.2, 1e-6), inclinationDeg: el(5, 1e-4),
      ascendingNodeDeg: el(10, 1e-4), argPerihelionDeg: el(20, 1e-4), perihelionTimeTdbDays: el(900, 1e-3),
    },
    unboundSignificance: null,
    vInfinityKmS: null,
    encounter: null,
    ...extra,
  };
}

describe('compareFits (METHODS §9.2: Δχ², likelihood-ratio p-value, A_k/σ, element sigma ratios)', () => {
  it('a large Δχ² with a 5-sigma A2 favours the non-gravitational fit, and the numbers are consistent', () => {
    const g = fakeFit('gravity-only', 3, 6);
    const cov = Array.from({ length: 7 }, (_, i) => Array.from({ length: 7 }, (_, j) => (i === j ? (i === 6 ? 1e-20 : 1e-12) : 0)));
    const ng = fakeFit('non-gravitational', 1, 7, {
      nonGrav: { a1: 0, a2: 5e-10, a3: 0, law: 'inverse-square' },
      parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2'],
      covariance: cov,
      elements: { ...g.elements!, perihelionTimeTdbDays: { value: 900, sigma: 3e-3 } },
    });
    const cmp = compareFits(g, ng, ['a2'], { gravityOnly: new Float64Array(40).fill(3), nonGrav: new Float64Array(40).fill(1) });
    expect(fitComparisonSchema.safeParse(cmp).success).toBe(true);
    expect(cmp.deltaChiSquare).toBeCloseTo(80, 10);
    // k = 1: p = erfc(√(Δχ²/2)), sigma = √Δχ² exactly
    expect(cmp.significanceSigma).toBeCloseTo(Math.sqrt(80), 6);
    expect(cmp.pValue).toBeCloseTo(chiSquareSurvival(80, 1), 20);
    expect(cmp.parameterSignificance[0].signalToNoise).toBeCloseTo(5, 10);
    const tp = cmp.elementSigmas.find((e) => e.element === 'perihelionTimeTdbDays')!;
    expect(tp.ratio).toBeCloseTo(3, 10);
    expect(cmp.verdict).toMatch(/non-gravitational fit is favoured/);
    // with encounter predictions, the verdict states how their uncertainty changes
    const enc = (sigmaKm: number) => ({ body: 'earth', closeApproachTdbDays: 12000, closeApproachUtc: '2032-11-08T12:00:00.000Z', distanceKm: 5e6, distanceSigmaKm: sigmaKm, positionSigmaMaxKm: 3 * sigmaKm, timeSigmaMin: 2 });
    const withEnc = compareFits({ ...g, encounter: enc(120) }, { ...ng, encounter: enc(2400) }, ['a2'], { gravityOnly: new Float64Array(40).fill(3), nonGrav: new Float64Array(40).fill(1) });
    expect(withEnc.verdict).toMatch(/2032-11-08: distance 1-sigma 120 km gravity-only, 2400 km with A2/);
  });

  it('with a same-set gravity-only refit, Δχ² is summed over every observation the non-grav fit uses', () => {
    // the gravity-only fit used 30 of 40 (10 rejected), the non-grav fit all 40: without the refit Δχ² would
    // cover only the 30 both use; with it (ξᵀWξ = 3 each on all 40) Δχ² = 40 × (3 − 1) = 80
    const g = fakeFit('gravity-only', 3, 6);
    const residuals = g.residuals.map((r, i) => (i < 10 ? { ...r, status: 'rejected' as const } : r));
    const cov = Array.from({ length: 7 }, (_, i) => Array.from({ length: 7 }, (_, j) => (i === j ? 1e-12 : 0)));
    const ng = fakeFit('non-gravitational', 1, 7, { nonGrav: { a1: 0, a2: 1e-7, a3: 0, law: 'inverse-square' }, parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2'], covariance: cov });
    const plain = { gravityOnly: new Float64Array(40).fill(3), nonGrav: new Float64Array(40).fill(1) };
    const without = compareFits({ ...g, residuals }, ng, ['a2'], plain);
    expect(without.deltaChiSquare).toBeCloseTo(60, 10);
    expect(without.observationsCompared).toBe(30);
    expect(without.gravityOnlyRefitted).toBe(false);
    const withRefit = compareFits({ ...g, residuals }, ng, ['a2'], plain, { plainChi2: new Float64Array(40).fill(3), used: new Uint8Array(40).fill(1) });
    expect(withRefit.deltaChiSquare).toBeCloseTo(80, 10);
    expect(withRefit.observationsCompared).toBe(40);
    expect(withRefit.gravityOnlyRefitted).toBe(true);
    expect(withRefit.verdict).toContain('over the 40 observations the non-gravitational fit uses (gravity-only refitted to them)');
    // the refit's encounter prediction (same data) is the one compared, not the original gravity-only fit's
    const enc = (sigmaKm: number) => ({ body: 'earth', closeApproachTdbDays: 12000, closeApproachUtc: '2032-11-08T12:00:00.000Z', distanceKm: 5e6, distanceSigmaKm: sigmaKm, positionSigmaMaxKm: 3 * sigmaKm, timeSigmaMin: 2 });
    const refitResult = { ...g, encounter: enc(100) };
    const withEnc = compareFits({ ...g, residuals, encounter: enc(300) }, { ...ng, encounter: enc(2400) }, ['a2'], plain, { plainChi2: new Float64Array(40).fill(3), used: new Uint8Array(40).fill(1), result: refitResult });
    expect(withEnc.gravityOnlyEncounter!.distanceSigmaKm).toBe(100);
    expect(withEnc.verdict).toMatch(/distance 1-sigma 100 km gravity-only, 2400 km with A2/);
    expect(compareFits({ ...g, encounter: enc(300) }, { ...ng, encounter: enc(2400) }, ['a2'], plain).gravityOnlyEncounter!.distanceSigmaKm).toBe(300);
  });

  it('a small Δχ² keeps the gravity-only fit', () => {
    const g = fakeFit('gravity-only', 1.02, 6);
    const cov = Array.from({ length: 7 }, (_, i) => Array.from({ length: 7 }, (_, j) => (i === j ? 1e-12 : 0)));
    const ng = fakeFit('non-gravitational', 1.0, 7, { nonGrav: { a1: 0, a2: 1e-7, a3: 0, law: 'inverse-square' }, parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2'], covariance: cov });
    const cmp = compareFits(g, ng, ['a2'], { gravityOnly: new Float64Array(40).fill(1.02), nonGrav: new Float64Array(40).fill(1.0) });
    expect(cmp.deltaChiSquare).toBeCloseTo(0.8, 10);
    expect(cmp.pValue).toBeCloseTo(chiSquareSurvival(0.8, 1), 12);
    expect(cmp.significanceSigma).toBeLessThan(1);
    expect(cmp.verdict).toMatch(/gravity-only fit is adequate/);
  });
});
