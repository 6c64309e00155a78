/**
 * assess(): the Engine II risk assessment (issue 4 item 8). Composes, for one orbit solution:
 *  - covariance intake (item 1): the solution's covariance (already Cartesian: input/solution.ts maps element
 *    covariances with a central-difference Jacobian of the element->state conversion) checked with
 *    linalg.validateCovariance on the scaled matrix; a non-positive-definite matrix is refused with the eigenvalue
 *    and direction, unless repair was asked, in which case the change is reported under "covariance.repair";
 *  - nominal close approaches (dynamics.findCloseApproaches);
 *  - the linear method at every approach (linear.ts), the line of variations (lov.ts) and Monte Carlo
 *    (montecarlo.ts, MC's module) as requested;
 *  - consequences (risk.assessConsequences) and Palermo / Torino ratings (risk.ratings).
 *
 * Output keys of issue 4 item 8 are fixed; numbers that do not apply are null (objects keep their keys with null
 * values). Extra fields are added beside them, never renamed.
 *
 * IP used for the ratings (order of preference, Tocsin policy, documented in "ratingProbabilitySource"):
 *  1. linear, when the linear method ran and passed its validity check (exact Gaussian integral, no sampling noise)
 *     and, if the LOV ran and found a virtual impactor, the two agree within a factor of 2. (In the tail, the IP
 *     hangs on the gap between the trace and the disk edge in units of the narrow sigma; the linear method takes
 *     that gap from the map linearised at the nominal, the LOV at the virtual impactor. On the 3-cross-sigma test
 *     case an importance-sampled Monte Carlo gives 4.7e-7: LOV 4.65e-7, linear 5.4e-6 although its +-3-sigma
 *     check passed; tests/unit/engine-assess-tail.test.ts. So a split goes to the sampling, else to the LOV.)
 *  2. Monte Carlo estimate, when it has >= 10 hits (relative standard error <= ~30%, METHODS.md §6.5);
 *  3. LOV, when it found a virtual impactor in the window;
 *  4. Monte Carlo estimate with 1-9 hits;
 *  5. linear flagged as not valid (reported with that flag).
 * A Monte Carlo run with zero hits gives an upper bound, not a probability; it is never used as a rating IP.
 * Palermo: impact energy from that approach's v-infinity (nominal diameter, density and albedo assumptions), dT from
 * the explicit analysis date (clamped at 1 day, risk/ratings.ts); null for approaches before the analysis date.
 * Torino: from the same IP and nominal energy.
 *
 * Disagreement flags: linear or LOV outside the Monte Carlo 95% Wilson interval (or above its 95% upper bound when
 * there are no hits); linear and LOV (both approximations without sampling error) differing by more than a factor of
 * 2 when either is above 1e-12 (Tocsin tolerance, common practice, no source).
 */
import { classifyOrbit } from '../classify';
import type { CloseApproach } from '../dynamics';
import { ChebyshevEphemeris, FRAME_TIE_DESCRIPTION } from '../ephemeris';
import { CovarianceError, validateCovariance, type CovarianceRepair } from '../linalg';
import { assessConsequences, binomialEstimate, palermoCumulative, palermoRating, torinoMax, torinoRating } from '../risk';
import { tdbJdFromDays, utcFromTdbDays } from '../time';
import { engineVersion } from '../version';
import { approachesOf, linearAssessment, type LinearApproachResult, type SolutionPoint, type WorkingCovariance } from './linear';
import { lovAssessment, type LovResult, type LovWindow } from './lov';
import type { AssessHooks, AssessOptions, McResult, McWindow, OrbitSolution, RunMonteCarlo } from './types';

export class AssessError extends Error {
  constructor(
    readonly code: 'NO_COVARIANCE' | 'INVALID_COVARIANCE' | 'NOT_AVAILABLE' | 'INVALID_OPTIONS',
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AssessError';
  }
}

/** Padding of the run's ephemeris beyond the window (linearity check and LOV searches look up to 30 d past). */
const EPHEMERIS_PAD_DAYS = 40;
const MC_MATCH_DAYS = 30;


export type McSummary = { hits: number | null; samples: number | null; estimate: number | null; ci95: [number, number] | null; upperBound95: number | null };

const NULL_MC: McSummary = { hits: null, samples: null, estimate: null, ci95: null, upperBound95: null };
const NULL_RANGE = { nominal: null, low: null, high: null };

function mcSummary(w: McWindow | null, samples: number): McSummary & { phrase: string } {
  const hits = w ? w.hits : 0;
  const n = w ? w.samples : samples;
  const b = binomialEstimate(hits, n);
  return { hits, samples: n, estimate: b.estimate, ci95: b.ci95, upperBound95: b.upperBound95, phrase: b.phrase };
}

/** Load MC's runMonteCarlo; a clear error until that module exists. */
async function loadRunMonteCarlo(): Promise<RunMonteCarlo> {
  // A variable specifier: the module is written in parallel (MC) and must not break type-checking while absent.
  let mod: { runMonteCarlo?: RunMonteCarlo } | null = null;
  let lastError: unknown = null;
  for (const spec of ['./montecarlo', './montecarlo.ts']) {
    try {
      mod = (await import(/* @vite-ignore */ spec)) as { runMonteCarlo?: RunMonteCarlo };
      break;
    } catch (err) {
      lastError = err;
    }
  }
  if (!mod) {
    throw new AssessError('NOT_AVAILABLE', `Monte Carlo is not available yet (server/engine/assess/montecarlo.ts could not be loaded: ${(lastError as Error).message})`);
  }
  if (typeof mod.runMonteCarlo !== 'function') throw new AssessError('NOT_AVAILABLE', 'Monte Carlo is not available yet (montecarlo.ts has no runMonteCarlo)');
  return mod.runMonteCarlo;
}

function lovWindowFor(lov: LovResult | null, a: { body: string; tdbDays: number }): LovWindow | null {
  if (!lov) return null;
  return lov.windows.find((w) => w.body === a.body && a.tdbDays >= w.tdbDaysMin - MC_MATCH_DAYS && a.tdbDays <= w.tdbDaysMax + MC_MATCH_DAYS) ?? null;
}

function mcWindowFor(mc: McResult | null, a: { body: string; tdbDays: number }): McWindow | null {
  if (!mc) return null;
  return mc.windows.find((w) => w.body === a.body && a.tdbDays >= w.tdbDaysMin - MC_MATCH_DAYS && a.tdbDays <= w.tdbDaysMax + MC_MATCH_DAYS) ?? null;
}

type Ips = { linear: number | null; linearValid: boolean | null; mc: McSummary | null; lov: number | null };

/** Linear and LOV (both approximations without sampling error) differ by more than a factor of 2. */
function linearLovSplit(ip: Ips): boolean {
  if (ip.linear === null || ip.lov === null || Math.max(ip.linear, ip.lov) <= 1e-12) return false;
  const lo = Math.min(ip.linear, ip.lov), hi = Math.max(ip.linear, ip.lov);
  return !(lo > 0) || hi / lo > 2;
}

function chooseIp(ip: Ips): { p: number | null; source: string | null } {
  if (ip.linear !== null && ip.linearValid === true && !linearLovSplit(ip)) return { p: ip.linear, source: 'linear' };
  if (ip.mc && ip.mc.hits !== null && ip.mc.hits >= 10) return { p: ip.mc.estimate, source: 'monteCarlo' };
  if (ip.lov !== null) return { p: ip.lov, source: 'lov' };
  if (ip.mc && ip.mc.hits !== null && ip.mc.hits > 0) return { p: ip.mc.estimate, source: 'monteCarlo' };
  if (ip.linear !== null) return { p: ip.linear, source: 'linear (flagged: linear method not validated)' };
  return { p: null, source: null };
}

function disagreements(ip: Ips): string[] {
  const flags: string[] = [];
  const mc = ip.mc;
  const check = (name: string, v: number | null) => {
    if (v === null || !mc || mc.hits === null) return;
    if (mc.hits === 0) {
      if (v > mc.upperBound95!) flags.push(`${name} IP ${v.toExponential(2)} is above the Monte Carlo 95% upper bound ${mc.upperBound95!.toExponential(2)} (0 hits in ${mc.samples})`);
    } else if (v < mc.ci95![0] || v > mc.ci95![1]) {
      flags.push(`${name} IP ${v.toExponential(2)} is outside the Monte Carlo 95% interval [${mc.ci95![0].toExponential(2)}, ${mc.ci95![1].toExponential(2)}]`);
    }
  };
  check('linear', ip.linear);
  check('LOV', ip.lov);
  if (linearLovSplit(ip)) flags.push(`linear (${ip.linear!.toExponential(2)}) and LOV (${ip.lov!.toExponential(2)}) differ by more than a factor of 2`);
  return flags;
}

export type AssessResult = Record<string, unknown> & {
  object: string;
  analysisDateUtc: string;
  provenance: Record<string, unknown>;
  approaches: Record<string, unknown>[];
  palermoCumulative: number | null;
  torinoMax: number | null;
  diameterM: { nominal: number | null; low: number | null; high: number | null };
};

export async function assess(solution: OrbitSolution, opts: AssessOptions, hooks: AssessHooks & { ephemeris?: ChebyshevEphemeris } = {}): Promise<AssessResult> {
  const t0 = performance.now();
  const methods = new Set(opts.methods);
  if (!(opts.untilTdbDays > solution.epochTdbDays)) {
    throw new AssessError('INVALID_OPTIONS', `--until must be after the solution epoch (TDB JD ${solution.epochTdbJd})`);
  }
  if (methods.has('mc') && !(Number.isInteger(opts.clones) && opts.clones > 0)) throw new AssessError('INVALID_OPTIONS', 'clones must be a positive integer');
  const timings: Record<string, number> = {};
  const notes: string[] = [];

  // 1. Covariance intake.
  let working: WorkingCovariance | null = null;
  let repair: CovarianceRepair | null = null;
  let conditionNumber: number | null = null;
  if (solution.covariance) {
    const names = solution.covariance.parameters;
    const expected = ['x', 'y', 'z', 'vx', 'vy', 'vz'];
    if (expected.some((nm, i) => names[i] !== nm)) throw new AssessError('INVALID_COVARIANCE', `covariance rows must start with ${expected.join(', ')} (got ${names.join(', ')})`);
    for (const nm of names.slice(6)) {
      if (!solution.nonGrav) throw new AssessError('INVALID_COVARIANCE', `covariance row ${nm} needs non-gravitational parameters in the solution`);
    }
    try {
      const v = validateCovariance(solution.covariance.matrix, { names, repair: opts.repairCovariance ?? false });
      working = { names: [...names], n: v.n, matrix: v.covariance };
      repair = v.repair;
      conditionNumber = v.correlationConditionNumber;
    } catch (err) {
      if (err instanceof CovarianceError) {
        throw new AssessError('INVALID_COVARIANCE', err.message, { code: err.code, eigenvalue: err.eigenvalue, ratio: err.ratio, direction: err.direction });
      }
      throw err;
    }
  } else {
    notes.push('the solution has no covariance: approaches are nominal only and no impact probability is computed');
    if (methods.has('mc') || methods.has('lov')) throw new AssessError('NO_COVARIANCE', 'Monte Carlo and LOV need a covariance, and the solution has none');
  }

  // 2. One ephemeris for the run.
  let tStart = performance.now();
  const eph = hooks.ephemeris ?? ChebyshevEphemeris.build(solution.epochTdbDays - 1, opts.untilTdbDays + EPHEMERIS_PAD_DAYS);
  timings.ephemerisSeconds = (performance.now() - tStart) / 1000;
  const nominal: SolutionPoint = {
    epochTdbDays: solution.epochTdbDays,
    positionAu: solution.positionAu,
    velocityAuD: solution.velocityAuD,
    nonGrav: solution.nonGrav,
  };
  const ctx = { nominal, ephemeris: eph, untilTdbDays: opts.untilTdbDays, bodies: opts.bodies, maxAu: opts.maxAu, tolerance: opts.tolerance };

  // 3. Nominal approaches and the linear method.
  tStart = performance.now();
  const approaches: CloseApproach[] = approachesOf(nominal, ctx);
  let linear: LinearApproachResult[] | null = null;
  if (working) {
    linear = linearAssessment({ ...ctx, covariance: working }, approaches);
  }
  timings.linearSeconds = (performance.now() - tStart) / 1000;

  // 4. LOV.
  let lov: LovResult | null = null;
  if (methods.has('lov') && working) {
    tStart = performance.now();
    lov = lovAssessment({ ...ctx, covariance: working }, {
      signal: hooks.signal,
      onProgress: (done, total) => hooks.onProgress?.({ stage: 'lov', done, total }),
    });
    timings.lovSeconds = (performance.now() - tStart) / 1000;
  }

  // 5. Monte Carlo (MC's module).
  let mc: McResult | null = null;
  if (methods.has('mc')) {
    const run = await loadRunMonteCarlo();
    tStart = performance.now();
    const mcSolution: OrbitSolution = working
      ? { ...solution, covariance: { parameters: solution.covariance!.parameters, matrix: toRows(working.matrix, working.n) } }
      : solution;
    mc = await run(mcSolution, { ...opts, ephemeris: eph }, {
      signal: hooks.signal,
      onProgress: (p) => hooks.onProgress?.({ stage: 'mc', done: p.done, total: p.total, rateClonesPerS: p.rateClonesPerS, etaS: p.etaS }),
    });
    timings.monteCarloSeconds = (performance.now() - tStart) / 1000;
  }

  // 6. Consequences.
  const hasH = solution.hMagnitude !== null;
  const consequencesFor = (vInf: number | null) =>
    hasH ? assessConsequences({ hMag: solution.hMagnitude!, albedo: solution.albedo ?? undefined, vInfinityKmS: vInf }) : null;
  const base = consequencesFor(null);
  if (!hasH) notes.push('no absolute magnitude H in the solution: diameter, energy, Palermo and Torino are null');

  const ratingsFor = (p: number | null, energyNominal: number | null, tdbDays: number) => {
    let palermo: number | null = null;
    let torino: number | null = null;
    let palermoDetail: unknown = null;
    if (p !== null && energyNominal !== null && energyNominal > 0) {
      if (tdbDays >= opts.analysisTdbDays) {
        const pr = palermoRating({ probability: p, energyMt: energyNominal, impactTdbDays: tdbDays, analysisTdbDays: opts.analysisTdbDays });
        palermo = pr.value;
        palermoDetail = { deltaTYears: pr.deltaTYears, deltaTClamped: pr.deltaTClamped, backgroundFrequencyPerYear: pr.backgroundFrequencyPerYear };
      }
      const tr = torinoRating(p, energyNominal);
      torino = tr.category;
    }
    return { palermo, torino, palermoDetail };
  };

  const usedMc = new Set<McWindow>();
  const usedLov = new Set<LovWindow>();
  const outApproaches = approaches.map((a, i) => {
    const lin = linear ? linear[i] : null;
    const u = utcFromTdbDays(a.tdbDays);
    const mw = mcWindowFor(mc, a);
    if (mw) usedMc.add(mw);
    const lw = lovWindowFor(lov, a);
    if (lw) usedLov.add(lw);
    const mcOut = mc ? mcSummary(mw, mc.samples) : null;
    const ips: Ips = {
      linear: methods.has('linear') && lin?.ip ? lin.ip.probability : null,
      linearValid: lin ? lin.validity.valid : null,
      mc: mcOut,
      lov: lw ? lw.impactProbability : null,
    };
    const chosen = chooseIp(ips);
    const cons = consequencesFor(a.vInfinityKmS);
    const energy = cons?.energyMt ?? null;
    const rat = ratingsFor(chosen.p, energy ? energy.nominal : null, a.tdbDays);
    const flags = disagreements(ips);
    if (lin && lin.validity.valid === false && methods.has('linear')) flags.push('linear method not valid here: ' + lin.validity.reasons.join('; '));
    return {
      body: a.body,
      epochTdbJd: tdbJdFromDays(a.tdbDays),
      utc: u.utc,
      utcPredicted: u.predicted,
      distanceKm: a.distanceKm,
      relativeSpeedKmS: a.relativeSpeedKmS,
      vInfinityKmS: a.vInfinityKmS,
      bPlane: a.bPlane ? { xiKm: a.bPlane.xiKm, zetaKm: a.bPlane.zetaKm } : null,
      impact: a.impact,
      distanceSigmaKm: lin ? lin.distanceSigmaKm : null,
      impactProbability: {
        linear: ips.linear,
        monteCarlo: mcOut ? { hits: mcOut.hits, samples: mcOut.samples, estimate: mcOut.estimate, ci95: mcOut.ci95, upperBound95: mcOut.upperBound95 } : { ...NULL_MC },
        lov: ips.lov,
      },
      energyMt: energy ? { nominal: energy.nominal, low: energy.low, high: energy.high } : { ...NULL_RANGE },
      palermo: rat.palermo,
      torino: rat.torino,
      // Extra fields (not part of the fixed set).
      ratingProbabilitySource: chosen.source,
      methodFlags: flags,
      windowEdge: a.windowEdge,
      captureRadiusKm: lin ? lin.captureRadiusKm : null,
      bPlaneCovarianceKm2: lin ? lin.bPlaneCovarianceKm2 : null,
      bPlaneSigmasKm: lin?.ip ? { major: lin.ip.sigmaMajorKm, minor: lin.ip.sigmaMinorKm, majorAxisAngleRad: lin.ip.majorAxisAngleRad } : null,
      distanceRangeKm: lin ? lin.distanceRangeKm : null,
      encounterTime: lin && lin.timeSigmaDays !== null
        ? {
            sigmaSeconds: lin.timeSigmaDays * 86400,
            oneSigmaUtc: lin.timeRangeTdbDays!.oneSigma.map((t) => utcFromTdbDays(t).utc),
            threeSigmaUtc: lin.timeRangeTdbDays!.threeSigma.map((t) => utcFromTdbDays(t).utc),
          }
        : null,
      linearValidity: lin ? lin.validity : null,
      monteCarloPhrase: mcOut ? mcOut.phrase : null,
      // The window's b-plane points (a capped subset, hits kept) for plots; absent without Monte Carlo.
      ...(mw ? { monteCarloBPlanePoints: mw.bPlanePoints } : {}),
      lovDetail: lov
        ? lw
          ? { virtualImpactors: lw.virtualImpactors, vasWithEncounter: lw.vasWithEncounter, found: lw.virtualImpactors.length > 0 }
          : { virtualImpactors: [], vasWithEncounter: 0, found: false }
        : null,
      palermoDetail: rat.palermoDetail,
      notes: lin ? lin.notes : [],
    };
  });

  // Windows found by MC or LOV with no nominal approach (potential impacts count toward the cumulative ratings).
  const otherWindows: Record<string, unknown>[] = [];
  for (const w of mc?.windows ?? []) {
    if (usedMc.has(w)) continue;
    const lw = lovWindowFor(lov, { body: w.body, tdbDays: w.tdbDaysMedian });
    if (lw) usedLov.add(lw);
    const mcOut = mcSummary(w, mc!.samples);
    const ips: Ips = { linear: null, linearValid: null, mc: mcOut, lov: lw ? lw.impactProbability : null };
    const chosen = chooseIp(ips);
    const energy = consequencesFor(w.vInfinityKmS)?.energyMt ?? null;
    const rat = ratingsFor(chosen.p, energy ? energy.nominal : null, w.tdbDaysMedian);
    otherWindows.push({
      source: 'monteCarlo',
      body: w.body,
      epochTdbJd: tdbJdFromDays(w.tdbDaysMedian),
      utc: utcFromTdbDays(w.tdbDaysMedian).utc,
      epochRangeTdbJd: [tdbJdFromDays(w.tdbDaysMin), tdbJdFromDays(w.tdbDaysMax)],
      minDistanceKm: w.minDistanceKm,
      vInfinityKmS: w.vInfinityKmS,
      impactProbability: { linear: null, monteCarlo: { hits: mcOut.hits, samples: mcOut.samples, estimate: mcOut.estimate, ci95: mcOut.ci95, upperBound95: mcOut.upperBound95 }, lov: ips.lov },
      energyMt: energy ? { nominal: energy.nominal, low: energy.low, high: energy.high } : { ...NULL_RANGE },
      palermo: rat.palermo,
      torino: rat.torino,
      ratingProbabilitySource: chosen.source,
      methodFlags: disagreements(ips),
      bPlanePoints: w.bPlanePoints,
    });
  }
  for (const w of lov?.windows ?? []) {
    if (usedLov.has(w) || w.impactProbability === null) continue;
    const t = w.virtualImpactors[0].tdbDays;
    const vInf = w.virtualImpactors[0].vInfinityKmS;
    const energy = consequencesFor(vInf)?.energyMt ?? null;
    const rat = ratingsFor(w.impactProbability, energy ? energy.nominal : null, t);
    otherWindows.push({
      source: 'lov',
      body: w.body,
      epochTdbJd: tdbJdFromDays(t),
      utc: utcFromTdbDays(t).utc,
      epochRangeTdbJd: [tdbJdFromDays(w.tdbDaysMin), tdbJdFromDays(w.tdbDaysMax)],
      vInfinityKmS: vInf,
      impactProbability: { linear: null, monteCarlo: { ...NULL_MC }, lov: w.impactProbability },
      energyMt: energy ? { nominal: energy.nominal, low: energy.low, high: energy.high } : { ...NULL_RANGE },
      palermo: rat.palermo,
      torino: rat.torino,
      ratingProbabilitySource: 'lov',
      lovDetail: { virtualImpactors: w.virtualImpactors, vasWithEncounter: w.vasWithEncounter, found: true },
    });
  }

  const allRated = [...outApproaches, ...otherWindows] as { palermo: number | null; torino: number | null }[];
  const torinos = allRated.filter((x) => x.torino !== null).map((x) => ({ category: x.torino! }));
  const cls = classifyOrbit({ positionAu: solution.positionAu, velocityAuD: solution.velocityAuD, covariance: solution.covariance });
  timings.totalSeconds = (performance.now() - t0) / 1000;

  const result: AssessResult = {
    object: solution.designation,
    analysisDateUtc: utcFromTdbDays(opts.analysisTdbDays).utc,
    provenance: {
      inputSha256: solution.source.inputSha256,
      engineVersion: engineVersion('Engine II'),
      ephemeris: `Chebyshev cache of VSOP87B (planets) and ELP/MPP02 (Moon), astronomia; ${FRAME_TIE_DESCRIPTION}`,
      integrator: 'IAS15 (15th-order Gauss-Radau, Pham-Rein-Spiegel 2024 step control), variational equations on the same steps',
      tolerance: opts.tolerance ?? 1e-9,
      seed: mc ? opts.seed : null,
      clones: mc ? mc.samples : null,
      // extras
      methods: [...methods],
      dynamics: 'Sun + Mercury..Neptune + Earth and Moon separately (DE440 GMs) + Sun 1PN relativity + non-gravitational (MSY) when given',
      analysisTdbJd: tdbJdFromDays(opts.analysisTdbDays),
      windowTdbJd: [solution.epochTdbJd, tdbJdFromDays(opts.untilTdbDays)],
      maxAu: opts.maxAu,
      bodies: opts.bodies,
      timings,
    },
    approaches: outApproaches,
    palermoCumulative: palermoCumulative(allRated.map((x) => x.palermo)),
    torinoMax: torinoMax(torinos),
    diameterM: base ? { nominal: base.diameterM.nominal, low: base.diameterM.low, high: base.diameterM.high } : { ...NULL_RANGE },
    // extras
    classification: {
      bound: cls.bound,
      eccentricity: cls.eccentricity,
      eccentricitySigma: cls.eccentricitySigma,
      unboundSignificance: cls.unboundSignificance,
      heliocentricVInfinityKmS: cls.vInfinityKmS,
      perihelionAu: cls.perihelionAu,
      note: cls.bound ? 'bound heliocentric orbit at the epoch' : 'unbound (hyperbolic) heliocentric orbit at the epoch: no periodic returns; approaches are those found by propagation only',
    },
    covariance: working
      ? { parameters: working.names, correlationConditionNumber: conditionNumber, repair, repaired: repair !== null }
      : null,
    otherWindows,
    methodNotes: {
      linear: 'STM from the variational equations; b-plane Gaussian integrated over the capture disk (METHODS 6.2-6.3); validity by a +-3-sigma propagation check and a near-disk check (tail factor exp(|m delta| + delta^2/2) <= 2)',
      monteCarlo: mc ? 'plain Monte Carlo with a seeded per-clone generator; Wilson 95% interval; zero hits give an upper bound' : null,
      lov: lov ? lov.method : null,
      lovNotes: lov ? lov.notes : null,
      lovSamples: lov ? lov.samples : null,
      lovPropagations: lov ? lov.propagations : null,
      ratingProbability: 'linear (if validated) > Monte Carlo (>= 10 hits) > LOV > Monte Carlo (1-9 hits) > linear (not validated)',
      consequences: base ? base.assumptions : null,
      palermo: 'Chesley et al. 2002: PS = log10(p / (f_B dT)), f_B = 0.03 E^-0.8 per year, dT from the analysis date (min 1 day)',
      torino: 'Binzel 2000 chart, straight-line digitisation (METHODS 8.2; rows 3-10 reconstructed)',
    },
    notes,
  };
  return result;
}

function toRows(a: Float64Array, n: number): number[][] {
  return Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, i * n + n)));
}

export const _internal = { chooseIp, disagreements };
