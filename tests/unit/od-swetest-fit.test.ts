/**
 * An outside check of the whole orbit-determination chain: astrometry of (1) Ceres made by Debian's swetest (Swiss
 * Ephemeris 2.10, data files sepl_18/semo_18/seas_18 of the swe-basic-data package, compressed from JPL DE431;
 * tests/reference/swetest.ts), written as IAU ADES PSV, read back with parseAdesPsv, and fitted with determineOrbit
 * from Gauss's method. The fitted state and the fitted orbit's later predictions are compared with swetest's own.
 *
 * The reference places are topocentric astrometric (`-noaberr -nodefl` with `-topo`: light time, no aberration, no
 * deflection), which is what METHODS.md §9.4 says catalogue-relative astrometry is. Nothing of the engine makes
 * these places; the engine only converts the chosen TT instants to the UTC written in obsTime (server/engine/time.ts,
 * itself checked here against TT − UTC = 69.184 s).
 *
 * What the fit cannot reproduce: our n-body model has no asteroid perturbers and a VSOP87-level planetary ephemeris,
 * whereas swetest's Ceres (file seas_18) is a numerical integration on the DE-series planets (recalled from memory).
 * So even noise-free data leave a small model error (swetest's own state carried by our model stays within ~0.03″ of
 * swetest over the arc, also in od-predict.test.ts); the bounds below are measured values with a stated margin.
 */
import { describe, expect, it } from 'vitest';
import { fitSettingsSchema, type Observatory, type OpticalObservation, type OrbitDeterminationResult } from '../../shared/schemas/od';
import { parseAdesPsv } from '../../server/engine/od/ades';
import { determineOrbit } from '../../server/engine/od/fit';
import { observerStatesAu } from '../../server/engine/od/observer';
import { predictAstrometry } from '../../server/engine/od/predict';
import { defaultEphemeris } from '../../server/engine/dynamics/ephemeris-source';
import { cholesky } from '../../server/engine/linalg/cholesky';
import { RandomStream } from '../../server/engine/risk/random';
import { AU_KM } from '../../server/engine/constants';
import { tdbDaysFromTtDays, utcFromTdbDays } from '../../server/engine/time';
import type { Vec3 } from '../../server/engine/vec';
import { assertSwetestAvailable, jdTtFromTdbDays, swetestSpherical, swetestStates } from '../reference/swetest';
import { sepArcsec } from '../helpers/angles';

const DEG = Math.PI / 180;
const J2000_JD = 2451545.0;
const MM_S_PER_AU_D = (AU_KM * 1e6) / 86400;


/** Three invented observatories (geodetic coordinates), Europe, the southern Andes and the central Pacific. */
const SITES: Observatory[] = [
  { code: 'HSA', name: 'A', longitudeDeg: 10.25, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 50.1, heightM: 300 },
  { code: 'HSB', name: 'B', longitudeDeg: 289.27, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -30.17, heightM: 2200 },
  { code: 'HSC', name: 'C', longitudeDeg: 203.7, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 20.7, heightM: 3050 },
];
const topoOf = (site: Observatory) => ({ eastLongitudeDeg: site.longitudeDeg, latitudeDeg: site.geodeticLatitudeDeg!, elevationM: site.heightM! });

/**
 * 14 nights over 175 days around Ceres's opposition of early October 2025 (arc 2025-06-20 .. 2025-12-12 TT), 2 or 3
 * observations 25 minutes apart per night, near local midnight, the sites taking turns: 38 observations. The arc ends
 * before 2025-12-28, the end of the engine's leap-second table, so every obsTime is a known (not predicted) UTC.
 */
const ARC_START_JD_TT = 2460846.5; // 2025-06-20 0h TT
const NIGHT_OFFSETS_DAYS = [0, 9, 21, 35, 50, 66, 80, 93, 105, 118, 132, 146, 159, 175];
const PER_NIGHT = [3, 2, 3, 3, 2, 3, 3, 2, 3, 3, 2, 3, 3, 3];
type Planned = { stn: string; jdTt: number };
const PLAN: Planned[] = NIGHT_OFFSETS_DAYS.flatMap((d, k) => {
  const site = SITES[k % SITES.length];
  const localMidnightUtcDayFraction = (((24 - site.longitudeDeg / 15) % 24) + 24) % 24 / 24;
  return Array.from({ length: PER_NIGHT[k] }, (_, j) => ({ stn: site.code, jdTt: ARC_START_JD_TT + d + localMidnightUtcDayFraction + (j * 25) / 1440 }));
});
const ARC_END_JD_TT = Math.max(...PLAN.map((p) => p.jdTt));

/** swetest's topocentric astrometric RA/Dec (degrees) of Ceres for every planned observation (noise-free). */
function referencePlaces(): { raDeg: number; decDeg: number }[] {
  return PLAN.map((p) => {
    const ref = swetestSpherical({ body: 'ceres', jdTt: p.jdTt, place: 'astrometric', topo: topoOf(SITES.find((s) => s.code === p.stn)!) });
    return { raDeg: ref.raDeg, decDeg: ref.decDeg };
  });
}

/** The UTC obsTime (ms) of a TT Julian date, through the engine's time module. */
function utcOfJdTt(jdTt: number): string {
  return utcFromTdbDays(tdbDaysFromTtDays(jdTt - J2000_JD)).utc;
}

/**
 * ADES PSV text of the arc: `noiseArcsec` Gaussian noise in RA·cos(dec) and Dec (seeded xoshiro256** + Box–Muller,
 * risk/random.ts), rmsRA/rmsDec = `rmsArcsec`, RA/Dec with 9 decimals of a degree (3.6 µas).
 */
function arcPsv(places: { raDeg: number; decDeg: number }[], noiseArcsec: number, rmsArcsec: number, seed: number): string {
  const rng = RandomStream.forClone(seed, 0);
  const lines = [
    '# version=2022',
    '# submitter',
    '! name Halden Sound Planetary Defence Office',
    '# comment',
    `! line Ceres topocentric astrometric places from swetest (DE431-derived), noise ${noiseArcsec} arcsec, seed ${seed}`,
    'provID|mode|stn|obsTime|ra|dec|rmsRA|rmsDec|astCat',
  ];
  PLAN.forEach((p, i) => {
    const { raDeg, decDeg } = places[i];
    const dRaCosDec = noiseArcsec * rng.normal();
    const dDec = noiseArcsec * rng.normal();
    const dec = decDeg + dDec / 3600;
    const ra = (((raDeg + dRaCosDec / 3600 / Math.cos(decDeg * DEG)) % 360) + 360) % 360;
    lines.push(['HSO-25-CE', 'CCD', p.stn, utcOfJdTt(p.jdTt), ra.toFixed(9), dec.toFixed(9), String(rmsArcsec), String(rmsArcsec), 'Gaia3'].join('|'));
  });
  return `${lines.join('\n')}\n`;
}

function readArc(psv: string): OpticalObservation[] {
  const parsed = parseAdesPsv(psv);
  expect(parsed.issues).toEqual([]);
  expect(parsed.observations).toHaveLength(PLAN.length);
  return parsed.observations;
}

function fitArc(observations: OpticalObservation[]): OrbitDeterminationResult {
  // Gauss's method (no initial orbit), gravity-only, outlier rejection on (the schema defaults).
  const settings = fitSettingsSchema.parse({ nonGravTerms: [], rejectOutliers: true });
  return determineOrbit({ observations, observatories: SITES, settings }, { skipEncounter: true });
}

/** swetest's heliocentric geometric ICRS state of Ceres at a TDB epoch (days from J2000). */
function swetestStateAt(epochTdbDays: number): { r: Vec3; v: Vec3 } {
  const [s] = swetestStates({ body: 'ceres', jdTt: jdTtFromTdbDays(epochTdbDays) });
  return { r: s.positionAu, v: s.velocityAuD };
}

/** Topocentric astrometric places of a state at the given TT instants, our model, against swetest (arcsec). */
function predictionErrorsArcsec(epochTdbDays: number, r: Vec3, v: Vec3, when: { stn: string; jdTt: number }[]): number[] {
  const times = when.map((w) => tdbDaysFromTtDays(w.jdTt - J2000_JD));
  const eph = defaultEphemeris(Math.min(epochTdbDays, ...times) - 2, Math.max(epochTdbDays, ...times) + 2);
  const st = observerStatesAu(when.map((w, i) => ({ stn: w.stn, obsTimeTdbDays: times[i] })), SITES, eph);
  const preds = predictAstrometry({
    epochTdbDays,
    positionAu: r,
    velocityAuD: v,
    nonGrav: null,
    model: 'n-body',
    observations: times.map((t, i) => ({ obsTimeTdbDays: t, observerPositionAu: st[i].positionAu, observerVelocityAuD: st[i].velocityAuD })),
    partials: false,
    ephemeris: eph,
    tolerance: 1e-11,
  });
  return when.map((w, i) => {
    const ref = swetestSpherical({ body: 'ceres', jdTt: w.jdTt, place: 'astrometric', topo: topoOf(SITES.find((s) => s.code === w.stn)!) });
    return sepArcsec(preds[i].raRad, preds[i].decRad, ref.raDeg * DEG, ref.decDeg * DEG);
  });
}

/** χ² = dᵀ C⁻¹ d of a 6-vector difference against a 6x6 covariance (scaled to a correlation matrix first). */
function stateChiSquare(d: number[], cov: number[][]): number {
  const s = cov.map((row, i) => Math.sqrt(row[i]));
  const R = new Float64Array(36);
  for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) R[6 * i + j] = cov[i][j] / (s[i] * s[j]);
  const L = cholesky(R, 6);
  if (!L) throw new Error('fit covariance is not positive definite');
  const z = d.map((x, i) => x / s[i]);
  const y = new Array(6).fill(0);
  for (let i = 0; i < 6; i++) {
    let t = z[i];
    for (let k = 0; k < i; k++) t -= L[6 * i + k] * y[k];
    y[i] = t / L[6 * i + i];
  }
  return y.reduce((a, b) => a + b * b, 0);
}

/** Checks two later nights, 60 and 180 days after the arc's end, one observation per site. */
const LATER = [60, 180].flatMap((d) => SITES.map((s, k) => ({ stn: s.code, jdTt: ARC_END_JD_TT + d + 0.1 * k, daysAfter: d })));

describe("determineOrbit on swetest's Ceres (outside check of ADES -> observer -> Gauss -> differential correction)", () => {
  // Fails (never skips) when swetest is missing: assertSwetestAvailable throws the install hint.
  assertSwetestAvailable();
  const places = referencePlaces();

  it('obsTime is UTC: TT − UTC = 69.184 s for every written line, and the parsed TDB is the planned instant', () => {
    // TT − TAI = 32.184 s (definition of TT) and TAI − UTC = 37 s since 2017-01-01 (IERS Bulletin C; recalled from
    // memory): 69.184 s throughout 2025.
    const obs = readArc(arcPsv(places, 0, 0.1, 1));
    obs.forEach((o, i) => {
      const jdUtc = Date.parse(o.obsTime) / 86400000 + 2440587.5; // Unix epoch = JD 2440587.5 UTC (common practice, no source)
      expect(Math.abs((PLAN[i].jdTt - jdUtc) * 86400 - 69.184)).toBeLessThan(1e-3);
      expect(Math.abs(o.obsTimeTdbDays - tdbDaysFromTtDays(PLAN[i].jdTt - J2000_JD)) * 86400).toBeLessThan(1e-3);
      expect(o.stn).toBe(PLAN[i].stn);
    });
    const arcDays = ARC_END_JD_TT - PLAN[0].jdTt;
    expect(arcDays).toBeGreaterThan(150);
    expect(arcDays).toBeLessThan(200);
    const t = obs.map((o) => o.obsTimeTdbDays).sort((a, b) => a - b);
    expect(1 + t.slice(1).filter((x, i) => x - t[i] > 0.25).length).toBe(NIGHT_OFFSETS_DAYS.length);
  });

  it('noise-free: converges from Gauss, rejects nothing, and reproduces swetest to the model error', () => {
    const obs = readArc(arcPsv(places, 0, 0.1, 1));
    const res = fitArc(obs);
    const g = res.gravityOnly;
    expect(res.preliminary?.method).toBe('gauss');
    expect(g.status).toBe('converged');
    expect(g.observationsUsed).toBe(PLAN.length);
    expect(g.residuals.filter((r) => r.status !== 'used')).toEqual([]);

    const ref = swetestStateAt(g.epochTdbDays);
    const dr = [0, 1, 2].map((k) => g.positionAu[k] - ref.r[k]);
    const dv = [0, 1, 2].map((k) => g.velocityAuD[k] - ref.v[k]);
    const drKm = Math.hypot(...dr) * AU_KM;
    const dvMmS = Math.hypot(...dv) * MM_S_PER_AU_D;
    const chi2 = stateChiSquare([...dr, ...dv], g.covariance!);
    const sig = g.covariance!.map((row, i) => Math.sqrt(row[i]));
    const sigPosKm = Math.hypot(sig[0], sig[1], sig[2]) * AU_KM;
    const sigVelMmS = Math.hypot(sig[3], sig[4], sig[5]) * MM_S_PER_AU_D;
    const maxResidual = Math.max(...g.residuals.map((r) => Math.hypot(r.raCosDecArcsec, r.decArcsec)));

    // Model error alone: swetest's own state at the epoch carried by our n-body model to the arc's and later instants.
    const modelOnArc = predictionErrorsArcsec(g.epochTdbDays, ref.r, ref.v, PLAN);
    const fitLater = predictionErrorsArcsec(g.epochTdbDays, g.positionAu as Vec3, g.velocityAuD as Vec3, LATER);
    const modelLater = predictionErrorsArcsec(g.epochTdbDays, ref.r, ref.v, LATER);
    const worstAt = (errs: number[], d: number) => Math.max(...errs.filter((_, i) => LATER[i].daysAfter === d));
    console.log(
      [
        `noise-free Ceres fit: ${g.observationsUsed}/${g.observationsTotal} used, ${g.iterations.length} iterations, epoch JD ${g.epochTdbJd} TDB`,
        `  Gauss on observations ${res.preliminary!.observationIndices.join(', ')}; correction measure by iteration ${g.iterations.map((it) => it.correctionMeasure.toExponential(2)).join(', ')}`,
        `  RMS ${g.rmsArcsec.toFixed(4)}″ (normalised ${g.rmsNormalized.toFixed(4)}), largest residual ${maxResidual.toFixed(4)}″`,
        `  swetest's state at the epoch carried by our model, over the arc: worst ${Math.max(...modelOnArc).toFixed(4)}″`,
        `  fitted minus swetest state: ${drKm.toFixed(2)} km, ${dvMmS.toFixed(2)} mm/s (fit 1-sigma ${sigPosKm.toFixed(2)} km, ${sigVelMmS.toFixed(3)} mm/s; chi² ${chi2.toExponential(2)}, 6 dof)`,
        `  prediction vs swetest, fitted orbit: +60 d ${worstAt(fitLater, 60).toFixed(4)}″, +180 d ${worstAt(fitLater, 180).toFixed(4)}″`,
        `  prediction vs swetest, swetest state: +60 d ${worstAt(modelLater, 60).toFixed(4)}″, +180 d ${worstAt(modelLater, 180).toFixed(4)}″`,
      ].join('\n'),
    );

    // Bounds: the value measured (engine as of this commit), times about 3, a margin for changes of integrator tolerance
    // or ephemeris fit that leave the model as good as it is. What an error in the chain does, tried by hand on this
    // arc: every obsTime 1 s late gives 54 km and 16 mm/s, 5 s late 230 km, 119 mm/s and an RMS of 0.011″.
    expect(g.rmsArcsec).toBeLessThan(0.01); // measured 0.0031″
    expect(maxResidual).toBeLessThan(0.02); // measured 0.0067″
    expect(Math.max(...modelOnArc)).toBeLessThan(0.08); // measured 0.027″ (od-predict.test.ts finds the same level)
    expect(drKm).toBeLessThan(30); // measured 10.1 km (swetest prints 0.15 km steps)
    expect(dvMmS).toBeLessThan(40); // measured 12.4 mm/s (swetest prints 1.7 mm/s steps)
    expect(worstAt(fitLater, 60)).toBeLessThan(0.075); // measured 0.024″
    expect(worstAt(fitLater, 180)).toBeLessThan(0.3); // measured 0.10″: the fit absorbed the model error over the arc
    // Does the model error dominate the fit uncertainty? Not at 0.1″ weights over 38 observations: the fit's 1-sigma
    // is ~500 km and ~100 mm/s, fifty times the difference, so swetest's state sits well inside the covariance
    // (measured chi² 0.93 with 6 dof; chi²(6) < 24.1 with probability 99.95 %, scipy chi2.ppf(0.9995, 6)). The km and
    // mm/s bounds above are the sharper check.
    expect(chi2).toBeLessThan(24.1);
    expect(drKm).toBeLessThan(0.1 * sigPosKm);
  }, 120_000);

  it("0.3″ Gaussian noise, rmsRA/rmsDec 0.3″, 20 seeds: normalised RMS near 1 and swetest's state inside the fit covariance", () => {
    const SEEDS = Array.from({ length: 20 }, (_, k) => k + 1);
    const rows: string[] = [];
    let stateChi2Sum = 0, residualChi2Sum = 0, residualDofSum = 0, rejectedSum = 0, worstStateChi2 = 0;
    for (const seed of SEEDS) {
      const res = fitArc(readArc(arcPsv(places, 0.3, 0.3, seed)));
      const g = res.gravityOnly;
      expect(res.preliminary?.method).toBe('gauss');
      expect(g.status).toBe('converged');
      const ref = swetestStateAt(g.epochTdbDays);
      const d = [0, 1, 2].map((k) => g.positionAu[k] - ref.r[k]).concat([0, 1, 2].map((k) => g.velocityAuD[k] - ref.v[k]));
      const chi2 = stateChiSquare(d, g.covariance!);
      const rejected = g.observationsTotal - g.observationsUsed;
      rows.push(`seed ${seed}: normalised RMS ${g.rmsNormalized.toFixed(3)} (RMS ${g.rmsArcsec.toFixed(3)}″), ${rejected} rejected, state ${(Math.hypot(d[0], d[1], d[2]) * AU_KM).toFixed(0)} km / ${(Math.hypot(d[3], d[4], d[5]) * MM_S_PER_AU_D).toFixed(0)} mm/s off, chi² ${chi2.toFixed(2)}`);
      stateChi2Sum += chi2;
      worstStateChi2 = Math.max(worstStateChi2, chi2);
      residualChi2Sum += g.chiSquare;
      residualDofSum += g.degreesOfFreedom;
      rejectedSum += rejected;
      // One fit's residual chi² with 2·38 − 6 = 70 dof lies in [37.5, 115.6] with probability 99.9 % (scipy
      // chi2.ppf(0.0005 / 0.9995, 70)): normalised RMS = sqrt(chi²/76) in [0.70, 1.23]; a rejected observation
      // removes its large chi_i², so only the upper end is tight.
      expect(g.rmsNormalized).toBeGreaterThan(0.6);
      expect(g.rmsNormalized).toBeLessThan(1.24);
      // The 6-vector difference against the fit covariance: chi²(6) < 24.1 with probability 99.95 % (scipy
      // chi2.ppf(0.9995, 6)); the model error (10 km, see the noise-free case) is ~1 % of the 1-sigma here.
      expect(chi2).toBeLessThan(24.1);
    }
    console.log(`0.3″ noise, ${SEEDS.length} seeds:\n  ${rows.join('\n  ')}\n  sum of state chi² ${stateChi2Sum.toFixed(1)} (${6 * SEEDS.length} dof, largest single ${worstStateChi2.toFixed(2)}), residual chi²/dof ${(residualChi2Sum / residualDofSum).toFixed(3)} over ${residualDofSum} dof, ${rejectedSum} rejected in all`);
    // Pooled over the 20 seeds: chi²(120) lies in [75.5, 177.6] with probability 99.9 % (scipy
    // chi2.ppf(0.0005 / 0.9995, 120)).
    expect(stateChi2Sum).toBeGreaterThan(75.5);
    expect(stateChi2Sum).toBeLessThan(177.6);
    // Residual chi² pooled over ~1400 dof: chi²/dof in [0.880, 1.129] at 99.9 % (scipy chi2.ppf(.., 1400) / 1400).
    // Rejections lower it: each removes a chi_i² above 8.4 (mean ~10.4, two dof), about 0.57 per fit, so the
    // expected ratio is ~0.93 (computed) and the lower bound is moved down by that 0.07 and a little more.
    expect(residualChi2Sum / residualDofSum).toBeGreaterThan(0.78);
    expect(residualChi2Sum / residualDofSum).toBeLessThan(1.13);
    // The rule (outliers.ts: chi_i² > 8 + 400·1.2^−38 = 8.39) rejects a good observation with probability
    // exp(−8.39/2) = 1.5 % (chi²(2) survival): 11.4 expected of 760; P(Poisson(11.4) > 24) = 0.04 % (scipy).
    expect(rejectedSum).toBeLessThanOrEqual(24);
  }, 120_000);
});
