/**
 * Linear impact probability, LOV agreement, covariance intake and the assess JSON (issue 4 items 1, 2, 4, 8).
 * Synthetic encounters (engine-assess-fixtures.ts): an asteroid aimed at the Earth 100 days after the solution epoch,
 * built from the Earth's ephemeris state and integrated back with the full dynamics.
 * Independent references:
 *  - near the disk edge with sigma << b the disk edge is locally straight, so IP = Phi((b - |mu|)/sigma_r) with
 *    sigma_r^2 = u^T Gamma_B u, u = mu/|mu| (Gaussian tail across a straight boundary; common practice, no source);
 *  - mean well inside the disk: IP = 1 to within the same tail (< 1e-12 here);
 *  - far miss: IP below the tail bound Phi(-(|mu| - b)/sigma_major);
 *  - LOV (lov.ts) is a different computation (VAs propagated with the full dynamics, 1-D mass x cross-trace
 *    fraction); on a nearly linear encounter it must agree with the linear IP (METHODS.md §6.3-6.4).
 */
import { describe, expect, it } from 'vitest';
import { assess, AssessError } from '../../server/engine/assess';
import { linearAssessment } from '../../server/engine/assess/linear';
import { lovAssessment } from '../../server/engine/assess/lov';
import type { AssessOptions, OrbitSolution } from '../../server/engine/assess/types';
import { normalCdf } from '../../server/engine/risk';
import { aimedAlongTrace, assessContext, ENCOUNTER_TDB_DAYS, fixtureEphemeris, syntheticSolution } from './engine-assess-fixtures';

const UNTIL = ENCOUNTER_TDB_DAYS + 30;
const ctxOf = assessContext;
const linearOf = (xi: number, zeta: number, st = 0) => {
  const { solution } = syntheticSolution({ xiKm: xi, zetaKm: zeta, sigmaAlongTrackAuD: st });
  const res = linearAssessment(ctxOf(solution));
  expect(res).toHaveLength(1);
  return { solution, lin: res[0] };
};
const opts = (s: OrbitSolution, over: Partial<AssessOptions> = {}): AssessOptions => ({
  untilTdbDays: UNTIL, methods: ['linear'], clones: 100, seed: 1, bodies: ['earth'], maxAu: 0.05, analysisTdbDays: s.epochTdbDays, ...over,
});

describe('linear impact probability on synthetic encounters', () => {
  it('mean inside the capture disk: IP = 1 - (tail < 1e-12)', () => {
    const { lin } = linearOf(0, 0);
    const [x, z] = [lin.approach.bPlane!.xiKm, lin.approach.bPlane!.zetaKm];
    expect(Math.hypot(x, z)).toBeLessThan(0.5 * lin.captureRadiusKm!);
    expect(lin.approach.impact).toBe(true);
    expect(lin.ip!.probability).toBeGreaterThan(1 - 1e-12);
    expect(lin.validity.valid).toBe(true);
  });

  it('grazing mean (|mu| = b): IP near 0.5 and equal to the straight-edge formula', () => {
    let tx = 9000, tz = 0;
    let lin = linearOf(tx, tz).lin;
    for (let it = 0; it < 2; it++) {
      const [x, z] = [lin.approach.bPlane!.xiKm, lin.approach.bPlane!.zetaKm];
      const d = Math.hypot(x, z);
      tx += ((lin.captureRadiusKm! - d) * x) / d;
      tz += ((lin.captureRadiusKm! - d) * z) / d;
      lin = linearOf(tx, tz).lin;
    }
    const [x, z] = [lin.approach.bPlane!.xiKm, lin.approach.bPlane!.zetaKm];
    const d = Math.hypot(x, z);
    const u = [x / d, z / d];
    const g = lin.bPlaneCovarianceKm2!;
    const sr = Math.sqrt(u[0] * u[0] * g[0][0] + 2 * u[0] * u[1] * g[0][1] + u[1] * u[1] * g[1][1]);
    const expected = normalCdf((lin.captureRadiusKm! - d) / sr);
    console.log(`grazing: |mu| - b = ${(d - lin.captureRadiusKm!).toFixed(3)} km, sigma_r = ${sr.toFixed(2)} km, IP = ${lin.ip!.probability}, edge formula ${expected}`);
    expect(lin.ip!.probability).toBeGreaterThan(0.3);
    expect(lin.ip!.probability).toBeLessThan(0.7);
    expect(Math.abs(lin.ip!.probability - expected)).toBeLessThan(0.01);
  });

  it('far miss (33,000 km): IP below the Gaussian tail bound', () => {
    const { lin } = linearOf(30000, 0);
    const d = Math.hypot(lin.approach.bPlane!.xiKm, lin.approach.bPlane!.zetaKm);
    const bound = normalCdf(-(d - lin.captureRadiusKm!) / lin.ip!.sigmaMajorKm);
    expect(lin.ip!.probability).toBeLessThanOrEqual(bound);
    expect(lin.ip!.probability).toBeLessThan(1e-100);
    expect(lin.approach.impact).toBe(false);
  });
});

describe('line of variations vs linear on a nearly linear encounter (METHODS.md §6.4)', () => {
  // Elongated uncertainty (along-track velocity), trace aimed to cross the disk at 1.2 sigma along it with a
  // cross-trace offset `crossOfCapture` x b (moderate IP), or just outside the disk (small IP).
  const aimed = (alongSigmas: number, crossOfCapture: number, crossSigmas = 0) => aimedAlongTrace(alongSigmas, crossOfCapture, crossSigmas);

  it('moderate IP: LOV and linear agree within 1%', () => {
    const { solution, lin } = aimed(1.2, 0.4);
    const t0 = performance.now();
    const lov = lovAssessment(ctxOf(solution));
    const secs = (performance.now() - t0) / 1000;
    expect(lov.windows).toHaveLength(1);
    const w = lov.windows[0];
    expect(w.virtualImpactors).toHaveLength(1);
    console.log(`LOV ${w.impactProbability} vs linear ${lin.ip!.probability}; ${lov.propagations} propagations, ${secs.toFixed(1)} s`);
    expect(lin.validity.valid).toBe(true);
    expect(lin.ip!.probability).toBeGreaterThan(0.05);
    expect(Math.abs(w.impactProbability! / lin.ip!.probability - 1)).toBeLessThan(0.01);
  });

  it('small IP (trace 3 cross-sigmas outside the disk): LOV finds a VI below 1e-5; a disagreement with linear beyond a factor 2 is flagged', async () => {
    // In the tail the IP is exponentially sensitive to the cross-trace offset (d ln IP / dm ~ 3/sigma_minor ~ 0.5/km),
    // so the linear extrapolation of the trace over 1.2 sigma_major (~20,000 km) and the propagated VA need not agree
    // to 5% even when the map is linear to 1e-3; assess() must then say so (issue 4 item 4).
    const { solution, lin } = aimed(1.2, 1, 3);
    const r = await assess(solution, opts(solution, { methods: ['linear', 'lov'] }), { ephemeris: fixtureEphemeris() });
    const a = r.approaches[0] as { impactProbability: { linear: number; lov: number }; methodFlags: string[]; lovDetail: { virtualImpactors: unknown[] } };
    console.log(`small: LOV ${a.impactProbability.lov} vs linear ${a.impactProbability.linear}; flags ${JSON.stringify(a.methodFlags)}`);
    expect(a.impactProbability.linear).toBeCloseTo(lin.ip!.probability, 12);
    expect(lin.ip!.probability).toBeGreaterThan(1e-10);
    expect(lin.ip!.probability).toBeLessThan(1e-4);
    expect(a.lovDetail.virtualImpactors.length).toBeGreaterThanOrEqual(1);
    expect(a.impactProbability.lov).toBeGreaterThan(1e-9);
    expect(a.impactProbability.lov).toBeLessThan(1e-5);
    const ratio = Math.max(a.impactProbability.lov, a.impactProbability.linear) / Math.min(a.impactProbability.lov, a.impactProbability.linear);
    expect(a.methodFlags.some((f) => /differ by more than a factor of 2/.test(f))).toBe(ratio > 2);
    // Which one is right: an importance-sampled Monte Carlo of this case with the full propagation gives
    // 4.685e-7 +- 0.6e-8 (65,536 clones; `npm run bench:tail`, engine-assess-tail.test.ts checks it at 8,192): the
    // LOV within 10%, linear far off. With the two split, the ratings use the LOV (assess.ts chooseIp).
    expect(Math.abs(a.impactProbability.lov / 4.685e-7 - 1)).toBeLessThan(0.1);
    expect(ratio).toBeGreaterThan(2);
    expect((a as unknown as { ratingProbabilitySource: string }).ratingProbabilitySource).toBe('lov');
    // The linear method now says so on its own (near-disk check, engine-assess-linear-tail.test.ts): not valid here.
    expect(lin.validity.valid).toBe(false);
    expect(a.methodFlags.some((f) => /^linear method not valid here: .*near the capture disk/.test(f))).toBe(true);
  });
});

describe('covariance intake (issue 4 item 1)', () => {
  it('refuses a non-positive-definite covariance naming the eigenvalue and direction', async () => {
    const { solution, ephemeris } = syntheticSolution({ xiKm: 30000, zetaKm: 0 });
    const m = solution.covariance!.matrix.map((r) => [...r]);
    m[0][1] = m[1][0] = 1.5 * m[0][0]; // correlation 1.5 between x and y: eigenvalue -0.5 along (x - y)/sqrt 2
    const bad = { ...solution, covariance: { parameters: solution.covariance!.parameters, matrix: m } };
    const err = await assess(bad, opts(bad), { ephemeris }).catch((e) => e);
    expect(err).toBeInstanceOf(AssessError);
    expect(err.code).toBe('INVALID_COVARIANCE');
    expect(err.message).toMatch(/not positive definite: eigenvalue -5\.000e-1 .* along \+0\.707 x -0\.707 y/);
    // even when repair is asked, a large negative eigenvalue is a data error (METHODS.md §6.1: |lambda_min|/lambda_max > 1e-6)
    const err2 = await assess(bad, opts(bad, { repairCovariance: true }), { ephemeris }).catch((e) => e);
    expect(err2.message).toMatch(/repair not attempted/);
  });

  it('repairs a round-off-level defect only when asked, and reports it', async () => {
    const { solution, ephemeris } = syntheticSolution({ xiKm: 30000, zetaKm: 0 });
    const m = solution.covariance!.matrix.map((r) => [...r]);
    m[0][1] = m[1][0] = (1 + 1e-9) * m[0][0]; // correlation 1 + 1e-9
    const s = { ...solution, covariance: { parameters: solution.covariance!.parameters, matrix: m } };
    await expect(assess(s, opts(s), { ephemeris })).rejects.toThrow(/not positive definite/);
    const r = await assess(s, opts(s, { repairCovariance: true }), { ephemeris });
    const cov = r.covariance as { repaired: boolean; repair: { clippedCount: number; mostNegativeRatio: number; relativeFrobeniusChange: number } };
    expect(cov.repaired).toBe(true);
    expect(cov.repair.clippedCount).toBeGreaterThanOrEqual(1);
    expect(cov.repair.mostNegativeRatio).toBeLessThan(0);
    expect(cov.repair.relativeFrobeniusChange).toBeGreaterThan(0);
    expect(cov.repair.relativeFrobeniusChange).toBeLessThan(1e-8);
  });
});

describe('assess output (issue 4 item 8)', () => {
  it('has exactly the fixed keys, nulls for what does not apply, and a clear error for Monte Carlo until it exists', async () => {
    const { solution, ephemeris } = syntheticSolution({ xiKm: 0, zetaKm: 0 });
    const r = JSON.parse(JSON.stringify(await assess(solution, opts(solution), { ephemeris })));
    for (const k of ['object', 'analysisDateUtc', 'provenance', 'approaches', 'palermoCumulative', 'torinoMax', 'diameterM']) expect(r).toHaveProperty(k);
    for (const k of ['inputSha256', 'engineVersion', 'ephemeris', 'integrator', 'tolerance', 'seed', 'clones']) expect(r.provenance).toHaveProperty(k);
    const a = r.approaches[0];
    for (const k of ['body', 'epochTdbJd', 'utc', 'distanceKm', 'relativeSpeedKmS', 'vInfinityKmS', 'bPlane', 'impact', 'distanceSigmaKm', 'impactProbability', 'energyMt', 'palermo', 'torino']) expect(a).toHaveProperty(k);
    expect(Object.keys(a.impactProbability).sort()).toEqual(['linear', 'lov', 'monteCarlo']);
    expect(Object.keys(a.impactProbability.monteCarlo).sort()).toEqual(['ci95', 'estimate', 'hits', 'samples', 'upperBound95']);
    expect(Object.keys(a.energyMt).sort()).toEqual(['high', 'low', 'nominal']);
    expect(Object.keys(r.diameterM).sort()).toEqual(['high', 'low', 'nominal']);
    expect(Object.keys(a.bPlane).sort()).toEqual(['xiKm', 'zetaKm']);
    // methods not run are null, not zero
    expect(a.impactProbability.lov).toBeNull();
    expect(a.impactProbability.monteCarlo.hits).toBeNull();
    expect(r.provenance.seed).toBeNull();
    // an impacting nominal: IP ~ 1 from the linear method, ratings from it (H = 22 -> ~140 m, METHODS.md §7)
    expect(a.impact).toBe(true);
    expect(a.impactProbability.linear).toBeGreaterThan(0.999999);
    expect(a.ratingProbabilitySource).toBe('linear');
    expect(r.diameterM.nominal).toBeGreaterThan(100);
    expect(r.diameterM.nominal).toBeLessThan(200);
    expect(a.energyMt.nominal).toBeGreaterThan(10);
    expect(a.torino).toBe(8); // p >= 0.99 and 0 <= log10 E < 2 (METHODS.md 8.2 rule 8) with E ~ 60-100 Mt
    expect(r.torinoMax).toBe(8);
    expect(r.palermoCumulative).toBeCloseTo(a.palermo, 12);
    // Monte Carlo is MC's module: until it exists the run must fail with a clear NOT_AVAILABLE error, never fake numbers
    const mc = await assess(solution, opts(solution, { methods: ['mc'], clones: 50 }), { ephemeris }).then((x) => x, (e) => e);
    if (mc instanceof Error) {
      expect((mc as AssessError).code).toBe('NOT_AVAILABLE');
      expect(mc.message).toMatch(/Monte Carlo is not available yet/);
    } else {
      expect((mc.approaches[0] as { impactProbability: { monteCarlo: { samples: number } } }).impactProbability.monteCarlo.samples).toBe(50);
    }
  });

  it('an unbound (hyperbolic) object gets its classification and only the approaches found by propagation', async () => {
    const { solution, ephemeris } = syntheticSolution({ xiKm: 30000, zetaKm: 0, vRelKmS: 40 });
    const r = await assess(solution, opts(solution, { untilTdbDays: ENCOUNTER_TDB_DAYS + 380 }), { ephemeris });
    const cls = r.classification as { bound: boolean; eccentricity: number; heliocentricVInfinityKmS: number };
    expect(cls.bound).toBe(false);
    expect(cls.eccentricity).toBeGreaterThan(1);
    expect(cls.heliocentricVInfinityKmS).toBeGreaterThan(0);
    expect(r.approaches).toHaveLength(1); // one passage, no periodic returns
    expect((r.approaches[0] as { impact: boolean }).impact).toBe(false);
  });
});
