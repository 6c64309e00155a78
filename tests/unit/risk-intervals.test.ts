import { describe, expect, it } from 'vitest';
import {
  binomialEstimate,
  clopperPearsonInterval,
  oneSidedUpperBound,
  ruleOfThreeUpper,
  wilsonInterval,
} from '../../server/engine/risk/intervals';

/** P(X <= k) and P(X >= k) for X ~ Binomial(n, p) by direct summation (independent of the Beta functions). */
function binomCdf(k: number, n: number, p: number): number {
  let term = (1 - p) ** n; // P(X = 0)
  let s = term;
  for (let j = 1; j <= k; j++) {
    term *= ((n - j + 1) / j) * (p / (1 - p));
    s += term;
  }
  return s;
}

describe('Wilson score interval (Wilson 1927, JASA 22, 209)', () => {
  it('K = 3, N = 10,000 -> [1.02e-4, 8.82e-4] (CHECKS.md 4, METHODS.md 6.5)', () => {
    const [lo, hi] = wilsonInterval(3, 10_000);
    expect(lo).toBeCloseTo(1.02e-4, 6);
    expect(hi).toBeCloseTo(8.82e-4, 6);
  });
  it('K = 0, N = 1000 -> upper 3.83e-3 (CHECKS.md 4)', () => {
    const [lo, hi] = wilsonInterval(0, 1000);
    expect(lo).toBe(0);
    expect(hi).toBeCloseTo(3.83e-3, 5);
  });
  it('rejects impossible counts', () => {
    expect(() => wilsonInterval(5, 4)).toThrow();
    expect(() => wilsonInterval(-1, 4)).toThrow();
    expect(() => wilsonInterval(1, 0)).toThrow();
  });
});

describe('rule of three (Hanley & Lippman-Hand 1983, JAMA 249, 1743)', () => {
  it('K = 0: upper bound 1 - 0.05^(1/N), about 3/N; 2.996/N at N = 1e6 (METHODS.md 6.5, computed)', () => {
    expect(ruleOfThreeUpper(1e6) * 1e6).toBeCloseTo(2.996, 3);
    for (const N of [10, 100, 1000, 1e5]) expect(ruleOfThreeUpper(N)).toBeCloseTo(1 - 0.05 ** (1 / N), 14);
    expect(ruleOfThreeUpper(1e4) * 1e4).toBeGreaterThan(2.99);
    expect(ruleOfThreeUpper(1e4) * 1e4).toBeLessThan(3);
  });
});

describe('Clopper-Pearson interval (Clopper & Pearson 1934, Biometrika 26, 404)', () => {
  it('bounds satisfy their defining binomial tail equations (checked by direct summation)', () => {
    for (const [k, n] of [[3, 10_000], [1, 50], [17, 400], [0, 300]]) {
      const [lo, hi] = clopperPearsonInterval(k, n);
      // upper: P(X <= k | hi) = 0.025; lower: P(X >= k | lo) = 0.025
      expect(binomCdf(k, n, hi)).toBeCloseTo(0.025, 9);
      if (k > 0) expect(1 - binomCdf(k - 1, n, lo)).toBeCloseTo(0.025, 9);
      else expect(lo).toBe(0);
    }
    // K = 0 two-sided upper = 1 - (alpha/2)^(1/N) (METHODS.md 6.5)
    expect(clopperPearsonInterval(0, 1000)[1]).toBeCloseTo(1 - 0.025 ** (1 / 1000), 12);
  });
  it('one-sided 95% upper bound: P(X <= K | bound) = 0.05', () => {
    expect(binomCdf(3, 10_000, oneSidedUpperBound(3, 10_000))).toBeCloseTo(0.05, 9);
    expect(oneSidedUpperBound(0, 2000)).toBe(ruleOfThreeUpper(2000));
  });
});

describe('Monte Carlo estimate object', () => {
  it('zero hits is an upper bound with a phrase, never 0', () => {
    const e = binomialEstimate(0, 1000);
    expect(e.estimate).toBeNull();
    expect(e.upperBound95).toBeCloseTo(2.991e-3, 6);
    expect(e.phrase).toBe('below 3.0e-3 at 95% (0 hits in 1000)');
    expect(e.ci95[0]).toBe(0);
    expect(e.ci95[1]).toBeCloseTo(3.83e-3, 5);
  });
  it('K > 0 gives K/N with the Wilson interval', () => {
    const e = binomialEstimate(3, 10_000);
    expect(e.estimate).toBe(3e-4);
    expect(e.ci95[0]).toBeCloseTo(1.02e-4, 6);
    expect(e.phrase).toContain('3.0e-4');
    expect(e.phrase).toContain('1.0e-4 to 8.8e-4');
    expect(e.method).toContain('Wilson');
  });
});
