import { describe, expect, it } from 'vitest';
import {
  ARCSEC_RAD,
  differentialCorrection,
  observationWeight,
  type LeastSquaresProblem,
} from '../../server/engine/od/leastSquares';
import { CHI2_RECOVER, observationChiSquares, outlierPass, rejectThreshold } from '../../server/engine/od/outliers';
import { RandomStream } from '../../server/engine/risk/random';

/**
 * A linear test problem: observation i at x_i "computes" (a + b x_i, a − b x_i) radians; sigma 1" in both
 * coordinates. Linear in (a, b), so least squares is exact in one step and the residual statistics are textbook.
 */
function lineProblem(xs: number[], data: Float64Array, sigmaArcsec = 1): LeastSquaresProblem & { obsCov: Float64Array } {
  const N = xs.length;
  const weights = new Float64Array(3 * N);
  const obsCov = new Float64Array(3 * N);
  for (let i = 0; i < N; i++) {
    const w = observationWeight(sigmaArcsec, sigmaArcsec, 0);
    weights.set(w.weight, 3 * i);
    obsCov.set(w.covariance, 3 * i);
  }
  return {
    n: 2,
    count: N,
    weights,
    obsCov,
    evaluate(p, withPartials) {
      const residuals = new Float64Array(2 * N);
      const partials = withPartials ? new Float64Array(4 * N) : null;
      for (let i = 0; i < N; i++) {
        residuals[2 * i] = data[2 * i] - (p[0] + p[1] * xs[i]);
        residuals[2 * i + 1] = data[2 * i + 1] - (p[0] - p[1] * xs[i]);
        if (partials) partials.set([1, xs[i], 1, -xs[i]], 4 * i);
      }
      return { residuals, partials };
    },
  };
}

function simulate(xs: number[], truth: [number, number], rs: RandomStream, sigmaArcsec = 1): Float64Array {
  const d = new Float64Array(2 * xs.length);
  xs.forEach((x, i) => {
    d[2 * i] = truth[0] + truth[1] * x + sigmaArcsec * ARCSEC_RAD * rs.normal();
    d[2 * i + 1] = truth[0] - truth[1] * x + sigmaArcsec * ARCSEC_RAD * rs.normal();
  });
  return d;
}

describe('outlier thresholds (Carpino, Milani & Chesley 2003 via METHODS §9.1)', () => {
  it('reject above 8 + 400·1.2^−N, recover below 7', () => {
    expect(rejectThreshold(10)).toBeCloseTo(8 + 400 / Math.pow(1.2, 10), 12);
    expect(rejectThreshold(10)).toBeCloseTo(72.6, 1);
    expect(rejectThreshold(100)).toBeCloseTo(8, 4);
    expect(CHI2_RECOVER).toBe(7);
  });
});

describe('observation chi-square with Γ_obs − P Γ Pᵀ (included) and + P Γ Pᵀ (excluded)', () => {
  it('is chi²-distributed with 2 degrees of freedom: mean 2 over many noise draws (with Γ_obs alone it would be (2N−n)/N)', () => {
    // Linear Gaussian least squares: the residual of an included observation has covariance Γ_obs − P Γ Pᵀ, that of
    // an excluded one Γ_obs + P Γ Pᵀ (standard regression theory; Milani & Gronchi 2010 ch. 5 via METHODS §9.1).
    const xs = [-2, -1, 0, 1, 2];
    const rs = RandomStream.forClone(3, 0);
    let sumIn = 0, countIn = 0, sumOut = 0, countOut = 0;
    for (let trial = 0; trial < 2000; trial++) {
      const data = simulate(xs, [1e-5, 2e-6], rs);
      const prob = lineProblem(xs, data);
      const used = [1, 1, 1, 1, 0];
      const fit = differentialCorrection(prob, new Float64Array(2), used, { maxIterations: 5 });
      const chi = observationChiSquares(fit.evaluation!.residuals, fit.evaluation!.partials!, prob.obsCov, fit.covariance!, used, 2);
      for (let i = 0; i < 4; i++) {
        sumIn += chi.chiSquare[i];
        countIn++;
      }
      sumOut += chi.chiSquare[4];
      countOut++;
    }
    // chi²_2 has mean 2 and sd 2: the mean of 8000 (correlated, 4 per trial) values is within ~0.1 of 2
    expect(Math.abs(sumIn / countIn - 2)).toBeLessThan(0.12);
    expect(Math.abs(sumOut / countOut - 2)).toBeLessThan(0.15);
  });
});

describe('reject and recover passes on a linear arc with injected outliers', () => {
  it('rejects exactly the injected outliers and recovers clean points that had been excluded', () => {
    const xs = Array.from({ length: 40 }, (_, i) => -1 + (2 * i) / 39);
    const rs = RandomStream.forClone(5, 0);
    const data = simulate(xs, [2e-5, -3e-6], rs, 0.5);
    const injected = [3, 17, 30];
    for (const i of injected) data[2 * i + 1] += 6 * ARCSEC_RAD; // 12 sigma in Dec
    const prob = lineProblem(xs, data, 0.5);
    // start with two clean observations wrongly excluded (as after a bad first pass)
    const used = new Uint8Array(40).fill(1);
    used[8] = 0;
    used[25] = 0;
    const locked = new Uint8Array(40);
    let params: Float64Array = new Float64Array(2);
    for (let pass = 0; pass < 20; pass++) {
      const fit = differentialCorrection(prob, params, used, { maxIterations: 10 });
      params = fit.params;
      const chi = observationChiSquares(fit.evaluation!.residuals, fit.evaluation!.partials!, prob.obsCov, fit.covariance!, used, 2);
      const d = outlierPass(chi.chiSquare, chi.judged, used, locked);
      // never more than a few percent per pass (METHODS §9.1): here at most 1 of 40
      expect(d.reject.length).toBeLessThanOrEqual(1);
      if (d.reject.length === 0 && d.recover.length === 0) break;
      for (const i of d.reject) used[i] = 0;
      for (const i of d.recover) used[i] = 1;
    }
    const rejected = Array.from(used).map((u, i) => (u ? -1 : i)).filter((i) => i >= 0);
    expect(rejected).toEqual(injected);
  });

  it('an analyst-locked observation is never recovered', () => {
    const chi = Float64Array.from([1, 1, 1, 1]);
    const d = outlierPass(chi, new Uint8Array([1, 1, 1, 1]), [1, 1, 0, 0], [0, 0, 1, 0]);
    expect(d.recover).toEqual([3]);
  });
});
