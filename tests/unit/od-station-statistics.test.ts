// Residual statistics per observatory (server/engine/od/stationStatistics.ts; METHODS.md §9.1 "σ from the submitted
// uncertainties if credible"). Sources of the checks:
//  - the sum of squares of 2n independent standard normals follows chi-square with 2n degrees of freedom, so for a
//    station whose stated sigmas are right the two-sided test flags a fraction WEIGHTS_P_VALUE of cases (definition
//    of the chi-square law; common practice, no source);
//  - the weighted mean and its standard error 1/sqrt(sum 1/sigma²) (common practice, no source), checked on
//    hand-computed numbers;
//  - end to end: an arc made through the engine (synthesizeAdesPsv) whose one station states half its real noise.
import { describe, expect, it } from 'vitest';
import { fitSettingsSchema, type Observatory, type Residual } from '../../shared/schemas/od';
import { parseAdesPsv } from '../../server/engine/od/ades';
import { determineOrbit } from '../../server/engine/od/fit';
import { MIN_OBSERVATIONS, stationStatistics, WEIGHTS_P_VALUE } from '../../server/engine/od/stationStatistics';
import { chiSquareCdf, chiSquareSurvival } from '../../server/engine/od/statistics';
import { RandomStream } from '../../server/engine/risk/random';
import { nightTimes, syntheticPsv, testOrbit } from '../helpers/odSynthetic';

type R = Pick<Residual, 'stn' | 'raCosDecArcsec' | 'decArcsec' | 'sigmaRaArcsec' | 'sigmaDecArcsec' | 'status'>;

function station(stn: string, n: number, trueSigma: number, statedSigma: number, rng: RandomStream, offset = 0): R[] {
  return Array.from({ length: n }, () => ({
    stn,
    raCosDecArcsec: offset + trueSigma * rng.normal(),
    decArcsec: trueSigma * rng.normal(),
    sigmaRaArcsec: statedSigma,
    sigmaDecArcsec: statedSigma,
    status: 'used' as const,
  }));
}

describe('station residual statistics', () => {
  it('hand-computed numbers: RMS, normalised RMS, weighted mean offset and its significance', () => {
    // residuals (RA, Dec): (0.3, 0.1), (0.1, -0.1), (0.2, 0.0) with sigma 0.2 in both, plus one rejected far point
    const rows: R[] = [
      { stn: 'X', raCosDecArcsec: 0.3, decArcsec: 0.1, sigmaRaArcsec: 0.2, sigmaDecArcsec: 0.2, status: 'used' },
      { stn: 'X', raCosDecArcsec: 0.1, decArcsec: -0.1, sigmaRaArcsec: 0.2, sigmaDecArcsec: 0.2, status: 'used' },
      { stn: 'X', raCosDecArcsec: 0.2, decArcsec: 0.0, sigmaRaArcsec: 0.2, sigmaDecArcsec: 0.2, status: 'used' },
      { stn: 'X', raCosDecArcsec: 9, decArcsec: 9, sigmaRaArcsec: 0.2, sigmaDecArcsec: 0.2, status: 'rejected' },
    ];
    const [s] = stationStatistics(rows);
    expect(s.used).toBe(3);
    expect(s.notUsed).toBe(1);
    // sum of squares 0.09 + 0.01 + 0.01 + 0.01 + 0.04 + 0 = 0.16 over 6 values
    expect(s.rmsArcsec!).toBeCloseTo(Math.sqrt(0.16 / 6), 12);
    expect(s.rmsNormalized!).toBeCloseTo(Math.sqrt(0.16 / 6) / 0.2, 12);
    // equal weights: mean 0.2, s.e. 0.2/sqrt(3); normalised RMS 0.816 < 1, so no inflation
    expect(s.offsetRaCosDecArcsec!).toBeCloseTo(0.2, 12);
    expect(s.offsetRaCosDecSigma!).toBeCloseTo(0.2 / (0.2 / Math.sqrt(3)), 10);
    expect(s.offsetDecArcsec!).toBeCloseTo(0, 12);
    // sum (xi/sigma)^2 = 4 against chi-square with 6 dof: well inside
    expect(s.weights).toBe('consistent');
  });

  it('a station with no used observation, or fewer than the minimum, gets no verdict', () => {
    const rng = RandomStream.forClone(3, 0);
    const rows = [...station('A', MIN_OBSERVATIONS - 1, 0.3, 0.3, rng), ...station('B', 4, 0.3, 0.3, rng).map((r) => ({ ...r, status: 'rejected' as const }))];
    const stats = stationStatistics(rows);
    expect(stats.map((s) => s.stn)).toEqual(['A', 'B']);
    expect(stats[0].weights).toBe('too-few');
    expect(stats[0].rmsArcsec).not.toBeNull();
    expect(stats[1]).toMatchObject({ used: 0, notUsed: 4, weights: 'too-few', rmsArcsec: null, offsetDecSigma: null });
  });

  it('calibrated: right sigmas are flagged about WEIGHTS_P_VALUE of the time; 1.5x understated or overstated ones as often as the chi-square law says', () => {
    const trials = 3000;
    let falseAlarms = 0;
    let caughtUnder = 0;
    let caughtOver = 0;
    for (let k = 0; k < trials; k++) {
      const rng = RandomStream.forClone(20261202, k);
      const [right, under, over] = stationStatistics([
        ...station('A', 20, 0.3, 0.3, rng),
        ...station('B', 40, 0.45, 0.3, rng), // residuals 1.5 times the stated sigma
        ...station('C', 40, 0.2, 0.3, rng), // residuals 1/1.5 of the stated sigma
      ]);
      if (right.weights !== 'consistent') falseAlarms++;
      if (under.weights === 'understated') caughtUnder++;
      if (over.weights === 'overstated') caughtOver++;
    }
    console.log(`station weights: ${falseAlarms} false alarms in ${trials} (expected ${trials * WEIGHTS_P_VALUE}); caught ${caughtUnder} understated, ${caughtOver} overstated`);
    // expected 3 false alarms (binomial, sd 1.7): more than 12 means the p-value is miscalibrated
    expect(falseAlarms).toBeLessThanOrEqual(12);
    // power from the chi-square law: the statistic is 2.25 (or 1/2.25) times chi-square with 80 dof, so it is
    // flagged with probability P(chi²_80 > c_hi / 2.25) (or P(chi²_80 < 2.25 c_lo)), c at WEIGHTS_P_VALUE / 2 per tail
    const invert = (f: (x: number) => number, target: number) => {
      let lo = 0, hi = 1000;
      for (let i = 0; i < 200; i++) {
        const mid = (lo + hi) / 2;
        if (f(mid) > target) hi = mid; else lo = mid;
      }
      return (lo + hi) / 2;
    };
    const cHi = invert((x) => 1 - chiSquareSurvival(x, 80), 1 - WEIGHTS_P_VALUE / 2);
    const cLo = invert((x) => chiSquareCdf(x, 80), WEIGHTS_P_VALUE / 2);
    const powerUnder = chiSquareSurvival(cHi / 2.25, 80);
    const powerOver = chiSquareCdf(cLo * 2.25, 80);
    console.log(`expected power ${powerUnder.toFixed(4)} understated, ${powerOver.toFixed(4)} overstated`);
    // binomial sd over 3000 trials is below 0.004: 4 sd
    expect(Math.abs(caughtUnder / trials - powerUnder)).toBeLessThan(0.016);
    expect(Math.abs(caughtOver / trials - powerOver)).toBeLessThan(0.016);
  });

  it('an offset of 0.1" on 0.3" residuals over 100 observations is about 3.3 sigma (s.e. 0.03")', () => {
    let sum = 0;
    const trials = 200;
    for (let k = 0; k < trials; k++) {
      const [s] = stationStatistics(station('D', 100, 0.3, 0.3, RandomStream.forClone(77, k), 0.1));
      sum += s.offsetRaCosDecSigma!;
    }
    expect(sum / trials).toBeGreaterThan(3.0);
    expect(sum / trials).toBeLessThan(3.7);
  });
});

describe('station statistics in a fit', () => {
  const OBSERVATORIES: Observatory[] = [
    { code: 'TQA', name: 'Test site A', longitudeDeg: 10, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 45, heightM: 500 },
    { code: 'TQB', name: 'Test site B', longitudeDeg: 250, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -30, heightM: 2000 },
  ];

  it('names the station that states half its real noise, and only that one', () => {
    const psv = syntheticPsv({ designation: 'TEST-1', orbit: testOrbit(), observatories: OBSERVATORIES, timesTdbDays: nightTimes(20, 3, 120), noiseArcsec: 0.5, seed: 11 });
    const parsed = parseAdesPsv(psv);
    expect(parsed.issues).toEqual([]);
    // TQB claims 0.25" for observations made with 0.5" noise
    const observations = parsed.observations.map((o) => (o.stn === 'TQB' ? { ...o, rmsRaArcsec: 0.25, rmsDecArcsec: 0.25 } : o));
    const r = determineOrbit({ observations, observatories: OBSERVATORIES, settings: fitSettingsSchema.parse({ rejectOutliers: false }) }, { skipEncounter: true });
    const stats = r.gravityOnly.stations!;
    const a = stats.find((s) => s.stn === 'TQA')!;
    const b = stats.find((s) => s.stn === 'TQB')!;
    expect(a.weights).toBe('consistent');
    expect(b.weights).toBe('understated');
    expect(b.rmsNormalized!).toBeGreaterThan(1.6);
    expect(b.rmsArcsec!).toBeGreaterThan(0.4);
    expect(b.rmsArcsec!).toBeLessThan(0.6);
    expect(r.warnings.filter((w) => /station .* stated uncertainties/.test(w))).toEqual([
      expect.stringMatching(/^gravity-only fit: station TQB's residuals are \d\.\d\d times its stated uncertainties over 30 observations \(uncertainties understated/),
    ]);
  });
});
