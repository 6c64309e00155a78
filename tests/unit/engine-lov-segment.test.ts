// Line-of-variations segment IP (server/engine/assess/lov.ts, lovSegmentIp) against the 2-D linear IP
// (risk/linear-ip). For a Gaussian solution in the linear regime the b-plane point is b(sigma) + e with
// sigma ~ N(0,1) and e ~ N(0, Gamma_Bc) independent, so its distribution is N(b(0), b' b'^T + Gamma_Bc): the two
// computations must agree (decomposition of a Gaussian; common practice, no source). The demo asteroid is a real
// case where the LOV direction carries only part of the b-plane spread along the trace.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { assess, lovSegmentIp } from '../../server/engine/assess';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { linearImpactProbability } from '../../server/engine/risk';
import { parseEpoch } from '../../server/engine/time';

function both(trace: [number, number], deriv: [number, number], cond: number[][], capture: number, sigmaAt = 0.7) {
  const lov = lovSegmentIp({ traceKm: trace, traceDerivKmPerSigma: deriv, sigmaAtTrace: sigmaAt, conditionalCovKm2: cond, captureRadiusKm: capture });
  // trace point at sigma = 0
  const mean: [number, number] = [trace[0] - sigmaAt * deriv[0], trace[1] - sigmaAt * deriv[1]];
  const total = [
    [deriv[0] * deriv[0] + cond[0][0], deriv[0] * deriv[1] + cond[0][1]],
    [deriv[1] * deriv[0] + cond[1][0], deriv[1] * deriv[1] + cond[1][1]],
  ];
  const lin = linearImpactProbability({ meanKm: mean, covarianceKm2: total }, capture).probability;
  return { lov, lin };
}

describe('LOV segment IP equals the 2-D Gaussian IP in the linear regime', () => {
  it('conditional spread across the trace only', () => {
    const { lov, lin } = both([8950, 3000], [0, 6000], [[400, 0], [0, 1e-6]], 9000);
    expect(lin).toBeGreaterThan(1e-4);
    expect(lov / lin).toBeGreaterThan(0.999);
    expect(lov / lin).toBeLessThan(1.001);
  });
  it('conditional spread along the trace too (the case the 1-D approximation missed), in the tail', () => {
    // along-trace conditional sigma 3,500 km beside a 5,700 km/sigma trace, disk 3 sigma away
    const { lov, lin } = both([400, -26000], [0, 5700], [[500, 20000], [20000, 3500 ** 2]], 11600, 1.2);
    expect(lin).toBeGreaterThan(1e-5);
    expect(lin).toBeLessThan(1e-2);
    expect(lov / lin).toBeGreaterThan(0.99);
    expect(lov / lin).toBeLessThan(1.01);
  });
  it('demo asteroid: LOV agrees with the linear method (a 20,000-clone Monte Carlo run gave 10 hits, 5e-4, 95% 2.7e-4 to 9.2e-4)', async () => {
    const solution = loadOrbitSolution(readFileSync('server/db/demo/hso-26-n4.opm', 'utf8'));
    const r = (await assess(solution, {
      untilTdbDays: parseEpoch('2035-01-01T00:00:00Z').tdbDays,
      methods: ['linear', 'lov'],
      clones: 1,
      seed: 1,
      bodies: ['earth'],
      maxAu: 0.05,
      analysisTdbDays: parseEpoch('2026-12-01T00:00:00Z').tdbDays,
    })) as any;
    const ip = r.approaches[0].impactProbability;
    expect(ip.linear).toBeGreaterThan(1e-4);
    expect(ip.linear).toBeLessThan(2e-3);
    expect(ip.lov / ip.linear).toBeGreaterThan(0.95);
    expect(ip.lov / ip.linear).toBeLessThan(1.05);
    expect(r.approaches[0].methodFlags).toEqual([]);
  }, 120_000);
});
