/**
 * Tail check (`npm run bench:tail`): linear vs LOV vs an importance-sampled Monte Carlo on the small-IP case of
 * tests/unit/engine-assess-linear.test.ts (synthetic asteroid aimed at the Earth 100 days out, along-track
 * velocity sigma 1.3e-6 AU/d, LOV trace crossing the b-plane 1.2 sigma along the major axis and 3 minor-axis sigmas
 * outside the capture disk). Prints figures, asserts nothing.
 *
 * Importance sampling (server/engine/assess/importanceSampling.ts): a 50/50 deterministic mixture of two
 * design-point Gaussians, one from the linear method's view (b-plane map linearised at the nominal) and one from
 * the LOV's view (linearised at the virtual impactor), so the proposal does not presuppose which method is right;
 * every clone is propagated with the Monte Carlo's own batch code (jobs/mc-task.ts runMcTask) and weighted p/q.
 *
 * Environment: TAIL_IS_CLONES (default 16384), TAIL_IS_SEED (default 1), TAIL_IS_WORKERS (default 0: this
 * thread), TAIL_IS_REPS (default 3: timed repetitions at the unit test's clone count, TAIL_IS_TEST_CLONES = 4096).
 * Last line: one JSON object with the figures.
 */
import os from 'node:os';
import { designPointProposalAt, gaussian, runImportanceSampling, type MixtureComponent } from '../../server/engine/assess/importanceSampling';
import { lovAssessment } from '../../server/engine/assess/lov';
import { McPool } from '../../server/engine/jobs/pool';
import { linearImpactProbability, principalAxes2 } from '../../server/engine/risk';
import { aimedAlongTrace, assessContext, ENCOUNTER_TDB_DAYS, fixtureEphemeris } from '../unit/engine-assess-fixtures';

const CLONES = Number(process.env.TAIL_IS_CLONES ?? 16384);
const SEED = Number(process.env.TAIL_IS_SEED ?? 1);
const WORKERS = Number(process.env.TAIL_IS_WORKERS ?? 0);
const REPS = Number(process.env.TAIL_IS_REPS ?? 3);
const TEST_CLONES = Number(process.env.TAIL_IS_TEST_CLONES ?? 4096);
const UNTIL = ENCOUNTER_TDB_DAYS + 30;
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length === 0 ? NaN : s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};
const e3 = (x: number) => x.toExponential(3);

// The case: `aimed(1.2, 1, 3)` of tests/unit/engine-assess-linear.test.ts (engine-assess-fixtures.ts).
const ctxOf = assessContext;
const aimed = aimedAlongTrace;

console.log(`Tocsin tail check: linear vs LOV vs importance sampling (Node ${process.version}, ${os.availableParallelism()} cores, load ${os.loadavg().map((x) => x.toFixed(1)).join(' ')})`);
const { solution, lin } = aimed(1.2, 1, 3);
const ctx = ctxOf(solution);
const n = ctx.covariance.n;
let t = performance.now();
const lov = lovAssessment(ctx);
const lovSeconds = (performance.now() - t) / 1000;
const vi = lov.windows[0].virtualImpactors[0];
const ipLin = lin.ip!.probability, ipLov = vi.impactProbability;
console.log(`linear IP ${e3(ipLin)} (sigma_major ${lin.ip!.sigmaMajorKm.toFixed(0)} km, sigma_minor ${lin.ip!.sigmaMinorKm.toFixed(2)} km, capture radius ${lin.captureRadiusKm!.toFixed(2)} km at v_inf ${lin.approach.vInfinityKmS!.toFixed(4)} km/s; linearity check ${(100 * lin.validity.nonlinearity!).toFixed(3)}% of the 3-sigma semi-axis)`);
console.log(`LOV IP    ${e3(ipLov)} (VI at sigma_LOV ${vi.sigmaLov.toFixed(5)}, trace ${vi.bPlaneDistanceKm.toFixed(2)} km from the centre, capture radius ${vi.captureRadiusKm.toFixed(2)} km at v_inf ${vi.vInfinityKmS.toFixed(4)} km/s; ${lov.propagations} propagations, ${lovSeconds.toFixed(1)} s)`);

// Proposal: design points of both linearisations.
const zero = new Float64Array(n);
const delta = lov.dxPerSigma.map((d) => d * vi.sigmaLov);
const atNominal = designPointProposalAt(ctx, zero, 'earth', ENCOUNTER_TDB_DAYS)!;
const atVi = designPointProposalAt(ctx, delta, 'earth', ENCOUNTER_TDB_DAYS)!;
const nom = [...solution.positionAu, ...solution.velocityAuD];
const target = gaussian(nom, ctx.covariance.matrix);
const proposal: MixtureComponent[] = [atNominal, atVi].map((p) => ({ weight: 0.5, gaussian: gaussian(nom.map((x, i) => x + p.meanDelta[i]), p.covariance) }));
for (const [name, p] of [['nominal (linear view)', atNominal], ['virtual impactor (LOV view)', atVi]] as const) {
  console.log(`  proposal at the ${name}: design point ${p.beta.toFixed(3)} sigma from the nominal, at (${p.designBPlaneKm.map((x) => x.toFixed(1)).join(', ')}) km; along-edge width ${p.alongEdgeSigma.toFixed(4)} sigma; nominal's linearised image (${p.nominalImageKm.map((x) => x.toFixed(2)).join(', ')}) km`);
}

// Where the factor comes from: the linear IP formula with each ingredient taken from the VA's linearisation.
const gbOf = (bj: Float64Array) => {
  const G = ctx.covariance.matrix;
  const q = (r: number, s: number) => { let v = 0; for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) v += bj[r * n + i] * G[i * n + j] * bj[s * n + j]; return v; };
  return [[q(0, 0), q(0, 1)], [q(1, 0), q(1, 1)]];
};
const ipWith = (meanKm: [number, number], bj: Float64Array, capKm: number) => linearImpactProbability({ meanKm, covarianceKm2: gbOf(bj) }, capKm).probability;
// Distance from the centre of the linearised trace (the line through the nominal's linearised image along the
// major axis of Gamma_B) and its gap to the capture disk, for each linearisation.
const traceOf = (p: typeof atNominal) => {
  const ax = principalAxes2(gbOf(p.bJacobian));
  const m = [-Math.sin(ax.angleRad), Math.cos(ax.angleRad)];
  const missKm = Math.abs(p.nominalImageKm[0] * m[0] + p.nominalImageKm[1] * m[1]);
  return { missKm, gapKm: missKm - p.captureRadiusKm, gapSigmaMinor: (missKm - p.captureRadiusKm) / ax.sigmaMinor, captureRadiusKm: p.captureRadiusKm, vInfinityKmS: p.approach.vInfinityKmS! };
};
const traces = { nominal: traceOf(atNominal), virtualImpactor: traceOf(atVi) };
for (const [k, v] of Object.entries(traces)) {
  console.log(`  trace linearised at the ${k}: passes ${v.missKm.toFixed(2)} km from the centre, capture radius ${v.captureRadiusKm.toFixed(2)} km (v_inf ${v.vInfinityKmS.toFixed(4)} km/s): gap ${v.gapKm.toFixed(2)} km = ${v.gapSigmaMinor.toFixed(3)} sigma_minor`);
}
const decomposition = {
  linear: ipWith(atNominal.nominalImageKm, atNominal.bJacobian, atNominal.captureRadiusKm),
  linearWithViCaptureRadius: ipWith(atNominal.nominalImageKm, atNominal.bJacobian, atVi.captureRadiusKm),
  linearWithViTrace: ipWith(atVi.nominalImageKm, atVi.bJacobian, atNominal.captureRadiusKm),
  linearisedAtVi: ipWith(atVi.nominalImageKm, atVi.bJacobian, atVi.captureRadiusKm),
  traceShiftKm: traces.virtualImpactor.missKm - traces.nominal.missKm,
  captureRadiusChangeKm: atVi.captureRadiusKm - atNominal.captureRadiusKm,
};
console.log(
  `decomposition (linear IP formula, Gaussian over the disk): nominal linearisation ${e3(decomposition.linear)}; ` +
    `with the VI's capture radius (${decomposition.captureRadiusChangeKm.toFixed(2)} km) ${e3(decomposition.linearWithViCaptureRadius)} (x ${(decomposition.linear / decomposition.linearWithViCaptureRadius).toFixed(2)}); ` +
    `with the VI's trace (${decomposition.traceShiftKm.toFixed(2)} km further out) ${e3(decomposition.linearWithViTrace)} (x ${(decomposition.linear / decomposition.linearWithViTrace).toFixed(2)}); ` +
    `both (linearised at the VI) ${e3(decomposition.linearisedAtVi)} (x ${(decomposition.linear / decomposition.linearisedAtVi).toFixed(2)})`,
);

const pool = WORKERS > 0 ? new McPool(WORKERS) : undefined;
const eph = fixtureEphemeris();
const runIs = (clones: number, seed: number) =>
  runImportanceSampling(target, proposal, {
    nominal: [...nom, 0, 0, 0],
    paramIndex: [0, 1, 2, 3, 4, 5],
    fromTdbDays: solution.epochTdbDays,
    untilTdbDays: UNTIL,
    bodies: ['earth'],
    maxAu: 0.05,
    seed,
    clones,
    ephemeris: eph,
    hitBody: 'earth',
    pool,
    sharedEphemeris: pool ? eph.exportShared() : undefined,
    ephemerisSpan: [eph.startTdbDays, eph.endTdbDays],
  });
try {
  const r = await runIs(CLONES, SEED);
  const plainClonesForSameSe = (r.estimate * (1 - r.estimate)) / r.standardError ** 2;
  console.log(
    `importance sampling: IP ${e3(r.estimate)} +- ${e3(r.standardError)} (1 s.e., ${(100 * r.relativeError).toFixed(1)}%), ` +
      `${r.hits} hits of ${r.samples} clones (per component ${r.hitsPerComponent.join(' / ')} of ${r.counts.join(' / ')}), seed ${SEED}; ` +
      `ESS of w*hit ${r.ess.toFixed(0)}, of all weights ${r.essWeights.toFixed(1)}; largest single hit ${(100 * r.maxHitWeight).toFixed(2)}% of the estimate; ` +
      `${r.wallSeconds.toFixed(1)} s (${(r.samples / r.wallSeconds).toFixed(0)} clones/s, ${WORKERS} workers)`,
  );
  console.log(`  plain Monte Carlo at ${r.samples} clones: s.e. ${e3(r.plainStandardError)} (${(r.plainStandardError / r.standardError).toFixed(0)} x larger); it would need ${e3(plainClonesForSameSe)} clones for this s.e.`);
  const zLov = (ipLov - r.estimate) / r.standardError, zLin = (ipLin - r.estimate) / r.standardError;
  console.log(`verdict: LOV / IS = ${(ipLov / r.estimate).toFixed(3)} (${zLov.toFixed(1)} s.e.); linear / IS = ${(ipLin / r.estimate).toFixed(2)} (${zLin.toFixed(0)} s.e.)`);

  const times: number[] = [];
  const tests: { estimate: number; se: number }[] = [];
  for (let i = 0; i < REPS; i++) {
    const q = await runIs(TEST_CLONES, 1);
    times.push(q.wallSeconds);
    tests.push({ estimate: q.estimate, se: q.standardError });
  }
  if (REPS > 0) {
    console.log(`unit-test size (${TEST_CLONES} clones, seed 1): IP ${e3(tests[0].estimate)} +- ${e3(tests[0].se)}; median ${median(times).toFixed(2)} s of ${REPS} runs (min ${Math.min(...times).toFixed(2)}, max ${Math.max(...times).toFixed(2)})`);
  }
  console.log(
    JSON.stringify({
      linear: ipLin,
      lov: ipLov,
      importanceSampling: { estimate: r.estimate, standardError: r.standardError, ess: r.ess, essWeights: r.essWeights, hits: r.hits, clones: r.samples, seed: SEED, wallSeconds: r.wallSeconds, workers: WORKERS },
      ratios: { lovOverIs: ipLov / r.estimate, linearOverIs: ipLin / r.estimate, plainOverIsStandardError: r.plainStandardError / r.standardError },
      decomposition,
      traces,
      testSize: { clones: TEST_CLONES, medianSeconds: median(times), estimate: tests[0]?.estimate ?? null, standardError: tests[0]?.se ?? null },
    }),
  );
} finally {
  await pool?.destroy();
}
