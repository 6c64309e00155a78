/**
 * UT1 − UTC as a fit setting (settings.ut1MinusUtcSeconds; METHODS.md §9.4): the schema's range and default, the
 * engine CLI's --ut1-utc, and a synthetic arc of a very close object generated with UT1 − UTC = 0.6 s, fitted with
 * the setting 0 and 0.6. Observer-geometry checks of the option itself (IERS 2010 eq. 5.15, swetest) are in
 * od-observer.test.ts.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { fitSettingsSchema, type Observatory, type OpticalObservation } from '../../shared/schemas/od';
import { runCli } from '../../server/engine/cli';
import { AU_KM } from '../../server/engine/constants';
import { defaultEphemeris } from '../../server/engine/dynamics/ephemeris-source';
import { EARTH_INDEX } from '../../server/engine/ephemeris/bodies';
import { parseAdesPsv } from '../../server/engine/od/ades';
import { determineOrbit } from '../../server/engine/od/fit';
import { solveNormal } from '../../server/engine/od/leastSquares';
import { observerStatesAu } from '../../server/engine/od/observer';
import { predictAstrometry } from '../../server/engine/od/predict';
import { chiSquareCdf } from '../../server/engine/od/statistics';
import { synthesizeAdesPsv } from '../../server/engine/od/synthetic';
import { utcFromTdbDays } from '../../server/engine/time';
import type { Vec3 } from '../../server/engine/vec';

describe('fitSettingsSchema.ut1MinusUtcSeconds', () => {
  // Leap seconds keep |UT1 − UTC| ≤ 0.9 s (IERS; common practice, no source).
  it('defaults to 0 (stored fits without the field), accepts ±0.9 and refuses −1, 1.5 and non-numbers with the message', () => {
    expect(fitSettingsSchema.parse({}).ut1MinusUtcSeconds).toBe(0);
    expect(fitSettingsSchema.parse({ epoch: null, nonGravTerms: ['a1'], stationWeights: [] }).ut1MinusUtcSeconds).toBe(0);
    expect(fitSettingsSchema.parse({ ut1MinusUtcSeconds: 0.9 }).ut1MinusUtcSeconds).toBe(0.9);
    expect(fitSettingsSchema.parse({ ut1MinusUtcSeconds: -0.9 }).ut1MinusUtcSeconds).toBe(-0.9);
    expect(fitSettingsSchema.parse({ ut1MinusUtcSeconds: 0.35 }).ut1MinusUtcSeconds).toBe(0.35);
    for (const bad of [-1, 1.5, 0.9000001]) {
      const r = fitSettingsSchema.safeParse({ ut1MinusUtcSeconds: bad });
      expect(r.success).toBe(false);
      expect(r.error!.issues).toEqual([expect.objectContaining({ path: ['ut1MinusUtcSeconds'], message: 'UT1 − UTC must be between −0.9 and 0.9 s (leap seconds keep UTC within 0.9 s of UT1)' })]);
    }
    for (const bad of [Number.NaN, '0.3', Infinity]) {
      const r = fitSettingsSchema.safeParse({ ut1MinusUtcSeconds: bad });
      expect(r.success).toBe(false);
      expect(r.error!.issues[0].path).toEqual(['ut1MinusUtcSeconds']);
      expect(r.error!.issues[0].message).toMatch(/UT1 − UTC/);
    }
  });
});

// ---------------------------------------------------------------------------------------------------------------
// A very close object (invented): 0.003 AU from the geocentre at T0, passing at 2 km/s relative to the Earth, seen
// on 7 nights (T0 − 3 d … T0 + 3 d) from two low-latitude sites, 4 observations per site and night (no nightly
// de-weighting), 0.1″ noise, observer positions generated with UT1 − UTC = 0.6 s.
// ---------------------------------------------------------------------------------------------------------------

const T0 = 10950.5; // 2029-12-24 0h TDB
const EPOCH_TEXT = 'JD:2462495.5';
const OBSERVATORIES: Observatory[] = [
  { code: 'TQE', name: 'Test site east', longitudeDeg: 20, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 10, heightM: 500 },
  { code: 'TQW', name: 'Test site west', longitudeDeg: 250, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -15, heightM: 2000 },
];
const GEN_UT1_MINUS_UTC_S = 0.6;
/** chi²_6 at 0.999 (22.458; recalled from memory, checked against statistics.ts below). */
const CHI2_6_999 = 22.458;

function closeOrbit() {
  const eph = defaultEphemeris(T0 - 1, T0 + 1);
  const e = new Float64Array(6);
  eph.stateInto(EARTH_INDEX, T0, e);
  const bAu = 0.003;
  const vAuD = (2 * 86400) / AU_KM;
  return { epochTdbDays: T0, positionAu: [e[0] + 0.6 * bAu, e[1], e[2] + 0.8 * bAu] as Vec3, velocityAuD: [e[3], e[4] + vAuD, e[5]] as Vec3, nonGrav: null };
}

const nights: { stn: string; utc: string; tdb: number }[] = [];
for (let n = -3; n <= 3; n++) {
  for (let s = 0; s < 2; s++) {
    for (let k = 0; k < 4; k++) {
      const tdb = T0 + n + (s === 0 ? 0.75 : 0.25) + k * 0.06;
      nights.push({ stn: OBSERVATORIES[s].code, utc: utcFromTdbDays(tdb).utc, tdb });
    }
  }
}

function arc(noiseArcsec: number, seed: number): OpticalObservation[] {
  const { psv } = synthesizeAdesPsv({
    designation: 'TEST-UT1',
    orbit: closeOrbit(),
    observatories: OBSERVATORIES,
    nights: nights.map(({ stn, utc }) => ({ stn, utc })),
    noiseArcsec,
    seed,
    ut1MinusUtcSeconds: GEN_UT1_MINUS_UTC_S,
  });
  const parsed = parseAdesPsv(psv);
  expect(parsed.issues).toEqual([]);
  return parsed.observations;
}

function fit(observations: OpticalObservation[], ut1MinusUtcSeconds: number, stationWeights: { stn: string; sigmaArcsec: number }[] = []) {
  const settings = fitSettingsSchema.parse({ epoch: EPOCH_TEXT, rejectOutliers: false, ut1MinusUtcSeconds, stationWeights });
  const r = determineOrbit({ observations, observatories: OBSERVATORIES, settings }, { skipEncounter: true });
  expect(r.gravityOnly.status).toBe('converged');
  return r.gravityOnly;
}

/** dᵀ Γ⁻¹ d over the six state parameters. */
function mahalanobis2(d: number[], covariance: number[][]): number {
  const cov = Float64Array.from(covariance.slice(0, 6).flatMap((r) => r.slice(0, 6)));
  const sol = solveNormal(cov, Float64Array.from(d), 6, false)!;
  return d.reduce((a, x, i) => a + x * sol.step[i], 0);
}
const stateMinus = (a: { positionAu: number[]; velocityAuD: number[] }, b: { positionAu: readonly number[]; velocityAuD: readonly number[] }) => [
  ...a.positionAu.map((x, i) => x - b.positionAu[i]),
  ...a.velocityAuD.map((x, i) => x - b.velocityAuD[i]),
];

describe('fitting a very close object with and without its UT1 − UTC', () => {
  it('the test geometry: 0.003–0.005 AU from the observers, where 0.6 s of UT1 − UTC is ~0.2 km of site, ~0.1″', () => {
    const orbit = closeOrbit();
    const eph = defaultEphemeris(T0 - 4, T0 + 4);
    const st = observerStatesAu(nights.map((x) => ({ stn: x.stn, obsTimeTdbDays: x.tdb })), OBSERVATORIES, eph);
    const p = predictAstrometry({
      ...orbit,
      model: 'n-body',
      observations: nights.map((x, i) => ({ obsTimeTdbDays: x.tdb, observerPositionAu: st[i].positionAu, observerVelocityAuD: st[i].velocityAuD })),
      partials: false,
      ephemeris: eph,
      tolerance: 1e-11,
    });
    const ranges = p.map((x) => x.rangeAu);
    expect(Math.min(...ranges)).toBeGreaterThan(0.0029);
    expect(Math.max(...ranges)).toBeLessThan(0.005);
    expect(chiSquareCdf(CHI2_6_999, 6)).toBeCloseTo(0.999, 4);
  });

  it(
    'noise-free: with the setting 0.6 the residuals vanish; with 0 a residual signature remains (measured)',
    () => {
      // No noise: rmsRA/rmsDec are left empty, so both stations get 0.1″ by the analyst weights.
      const obs = arc(0, 1);
      const weights = OBSERVATORIES.map((o) => ({ stn: o.code, sigmaArcsec: 0.1 }));
      const right = fit(obs, GEN_UT1_MINUS_UTC_S, weights);
      const wrong = fit(obs, 0, weights);
      console.log(`noise-free, 0.1″ weights, ${obs.length} observations: chi² ${wrong.chiSquare.toFixed(2)} with UT1 − UTC 0 (RMS ${wrong.rmsArcsec.toFixed(4)}″) vs ${right.chiSquare.toExponential(2)} with 0.6`);
      // Right setting: only the 1e-9 deg (3.6 µas) rounding of the file and the integrator remain.
      expect(right.rmsArcsec).toBeLessThan(0.002);
      // Wrong setting: most of the ~0.1″ signature is absorbed by the orbit, but not all (measured chi² 14.8 over 56
      // observations, i.e. an expected normalised RMS of only sqrt((106 + 14.8) / 112) = 1.04 with 0.1″ noise).
      expect(wrong.chiSquare).toBeGreaterThan(5);
      expect(wrong.rmsArcsec).toBeGreaterThan(10 * right.rmsArcsec);
    },
    120_000,
  );

  it(
    '0.1″ noise: fitted with 0.6 the RMS is chi-square consistent and the state is recovered within its covariance; with 0 the state is off by > 4.7 sigma',
    () => {
      const truth = closeOrbit();
      const obs = arc(0.1, 2);
      const right = fit(obs, GEN_UT1_MINUS_UTC_S);
      const wrong = fit(obs, 0);
      const chiRight = mahalanobis2(stateMinus(right, truth), right.covariance!);
      const chiWrong = mahalanobis2(stateMinus(wrong, truth), wrong.covariance!);
      const shift = stateMinus(wrong, right);
      const shiftSigma2 = mahalanobis2(shift, right.covariance!);
      console.log(
        `0.1″ noise, ${obs.length} observations: normalised RMS ${wrong.rmsNormalized.toFixed(3)} with 0 vs ${right.rmsNormalized.toFixed(3)} with 0.6 ` +
          `(chi² ${wrong.chiSquare.toFixed(1)} vs ${right.chiSquare.toFixed(1)}, ${right.degreesOfFreedom} dof); (fit − truth)ᵀΓ⁻¹(fit − truth) ${chiWrong.toFixed(1)} vs ${chiRight.toFixed(1)}; ` +
          `ignoring UT1 − UTC moves the state by ${(Math.hypot(shift[0], shift[1], shift[2]) * AU_KM).toFixed(3)} km, ${Math.sqrt(shiftSigma2).toFixed(2)} sigma`,
      );
      // With the setting: residuals as the noise (two-sided 0.1 % band of chi² with the fit's degrees of freedom)
      // and the truth inside the 99.9 % ellipsoid of the covariance (linear least-squares theory; Milani & Gronchi
      // 2010 ch. 5 [M via METHODS §9.1]).
      const p = chiSquareCdf(right.chiSquare, right.degreesOfFreedom);
      expect(p).toBeGreaterThan(0.001);
      expect(p).toBeLessThan(0.999);
      expect(Math.abs(right.rmsNormalized - 1)).toBeLessThan(0.2);
      expect(chiRight).toBeLessThan(CHI2_6_999);
      // Without it: the RMS rises only a little (measured 1.06 vs 0.96), but the state moves outside the 99.9 %
      // ellipsoid (measured 5.7 sigma, the same for every seed: the shift does not depend on the noise).
      expect(wrong.chiSquare).toBeGreaterThan(right.chiSquare);
      expect(shiftSigma2).toBeGreaterThan(CHI2_6_999);
      expect(chiWrong).toBeGreaterThan(CHI2_6_999);
    },
    120_000,
  );
});

describe('CLI fit --ut1-utc', () => {
  const tmp = mkdtempSync(join(tmpdir(), 'tocsin-od-ut1-'));
  const PSV = join(tmp, 'close.psv');
  const OBS_JSON = join(tmp, 'observatories.json');
  beforeAll(() => {
    // the same arc as arc(0.1, 2)
    writeFileSync(
      PSV,
      synthesizeAdesPsv({ designation: 'TEST-UT1', orbit: closeOrbit(), observatories: OBSERVATORIES, nights: nights.map(({ stn, utc }) => ({ stn, utc })), noiseArcsec: 0.1, seed: 2, ut1MinusUtcSeconds: GEN_UT1_MINUS_UTC_S }).psv,
    );
    writeFileSync(OBS_JSON, JSON.stringify({ observatories: OBSERVATORIES }));
  });

  it('passes the value to the fit (the same result as the engine with the setting); refuses out-of-range values as usage errors', async () => {
    const r = await runCli(['fit', PSV, '--observatories', OBS_JSON, '--epoch', EPOCH_TEXT, '--no-outliers', '--ut1-utc', '0.6']);
    expect(r.exitCode).toBe(0);
    const out = JSON.parse(r.stdout);
    const engine = fit(arc(0.1, 2), 0.6);
    expect(out.fit.rmsNormalized).toBeCloseTo(engine.rmsNormalized, 10);
    const r0 = await runCli(['fit', PSV, '--observatories', OBS_JSON, '--epoch', EPOCH_TEXT, '--no-outliers']);
    expect(JSON.parse(r0.stdout).fit.rmsNormalized).toBeGreaterThan(out.fit.rmsNormalized);
    // a negative value needs the = form (node:util parseArgs)
    const neg = await runCli(['fit', PSV, '--observatories', OBS_JSON, '--epoch', EPOCH_TEXT, '--no-outliers', '--ut1-utc=-0.6']);
    expect(neg.exitCode).toBe(0);
    expect(JSON.parse(neg.stdout).fit.rmsNormalized).toBeGreaterThan(JSON.parse(r0.stdout).fit.rmsNormalized);
    for (const bad of ['1.5', '-1', 'abc', '']) {
      const e = await runCli(['fit', PSV, '--observatories', OBS_JSON, `--ut1-utc=${bad}`]);
      expect(e.exitCode).toBe(2);
      const err = JSON.parse(e.stderr).error;
      expect(err.code).toBe('USAGE');
      expect(err.message).toMatch(/--ut1-utc must be a number of seconds in \[-0\.9, 0\.9\]/);
    }
  }, 120_000);
});
