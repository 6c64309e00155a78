/**
 * Monte Carlo benchmark (`npm run bench:mc`): prints figures, asserts nothing (issue 4 item 9).
 *
 * Case (invented): a near-Earth orbit (a ~ 1.5 AU, e ~ 0.4, i ~ 10 deg) passing ~20,000 km from the Earth's centre
 * half-way through a 10-year window; clones drawn from a 100 km / 0.01 mm/s isotropic covariance (a well-determined
 * orbit), so the batch goes through the encounter with the clones together. IAS15 epsilon 1e-9 (the Monte Carlo
 * default, the epsilon the tests use), 2 predictor-corrector iterations, batches of 128, Earth and Moon monitored.
 *
 * For one worker and for all workers (os.availableParallelism()) in the same process, interleaved, REPS runs each:
 *  - clone-years per second by wall clock on a warm pool (threads started, tsx loaded, ephemeris built, JIT warm:
 *    a long-lived server pool), median of the runs; and the same end to end including a fresh pool's start-up;
 *  - CPU seconds of the process (all threads) per run;
 *  - the speed-up = median all-worker rate / median one-worker rate;
 *  - peak RSS of the process (maxRSS, includes the worker threads).
 * Also the ephemeris cost per worker (build in the worker vs the size of the coefficients a transfer would copy),
 * and the linear impact-probability time (LIN's linearAssessment on the same solution).
 * The machine is shared with other work: medians of several runs; the speed-up is a ratio from the same run.
 * Last line: one JSON object {"cloneYearsPerSecond":{"oneWorker","allWorkers"},"speedup","peakRssMb","linearIpSeconds"}.
 */
import os from 'node:os';
import { runMonteCarlo, type McOptions } from '../../server/engine/assess/montecarlo';
import type { OrbitSolution } from '../../server/engine/assess/types';
import { AU_KM, DAY_S } from '../../server/engine/constants';
import { ChebyshevEphemeris, GRANULES } from '../../server/engine/ephemeris';
import { McPool } from '../../server/engine/jobs/pool';
import { neaCase } from '../unit/engine-mc-cases';

const T0 = 10957.5; // 2030-01-01 12:00 TDB
const YEARS = 10;
const T1 = T0 + YEARS * 365.25;
const CLONES = Number(process.env.MC_BENCH_CLONES ?? 1024);
const REPS = Number(process.env.MC_BENCH_REPS ?? 3);
const ALL = os.availableParallelism();
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};
const fmt = (x: number, d = 0) => x.toLocaleString('en-US', { maximumFractionDigits: d, minimumFractionDigits: d });

console.log(`Tocsin Monte Carlo benchmark (Node ${process.version}, ${ALL} cores, load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')})`);
let t = performance.now();
const eph = ChebyshevEphemeris.build(T0 - 1, T1 + 1, { useMemo: false });
const buildS = (performance.now() - t) / 1000;
const coeffBytes = GRANULES.reduce((s, g) => s + Math.ceil((T1 - T0 + 2) / g.granuleDays + 1) * 3 * (g.degree + 1) * 8, 0);
const copy = new Float64Array(coeffBytes / 8).fill(1);
t = performance.now();
for (let i = 0; i < 10; i++) structuredClone(copy);
const cloneMs = (performance.now() - t) / 10;
console.log(`ephemeris: ${YEARS} years built in ${fmt(buildS, 2)} s (no memo); a transfer would structured-clone ~${fmt(coeffBytes / 1e6, 2)} MB (${fmt(cloneMs, 1)} ms).`);
console.log('  Workers build their own cache once per run (jobs/mc-worker.ts): per worker this costs the build time above,');
console.log(`  ${fmt((buildS / (CLONES * YEARS)) * 1e6, 1)} us per clone-year of a ${CLONES}-clone run; a transfer would be cheaper but needs the cache's private arrays.`);

const c = neaCase(eph, { startTdbDays: T0, encounterTdbDays: T0 + 5 * 365.25 + 37, missKm: 20_000, a: 1.5, e: 0.4, incDeg: 10 });
const sr = 100 / AU_KM, sv = (1e-8 * DAY_S) / AU_KM;
const solution = {
  designation: 'BENCH-1',
  name: null,
  epochTdbDays: T0,
  epochTdbJd: T0 + 2451545,
  positionAu: c.positionAu,
  velocityAuD: c.velocityAuD,
  covariance: { parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'], matrix: [0, 1, 2, 3, 4, 5].map((i) => [0, 1, 2, 3, 4, 5].map((j) => (i === j ? (i < 3 ? sr * sr : sv * sv) : 0))) },
  nonGrav: null,
  hMagnitude: null,
  albedo: null,
  kind: 'unknown',
  notes: [],
  source: { format: 'tocsin-json', inputSha256: '0'.repeat(64), epochText: 'bench', timeScale: 'TDB' },
} as OrbitSolution;
const base: McOptions = { untilTdbDays: T1, methods: ['mc'], clones: CLONES, seed: 1, bodies: ['earth', 'moon'], maxAu: 0.05, analysisTdbDays: T0, ephemeris: eph };

// In-process reference (this thread), one run: also shows the encounter.
t = performance.now();
const ref = await runMonteCarlo(solution, { ...base, clones: 256, workers: 0 });
const inProcRate = ref.cloneYears / ((performance.now() - t) / 1000);
console.log(`\nin-process (this thread, 256 clones, cold JIT): ${fmt(inProcRate)} clone-years/s; ${ref.steps} lockstep steps in 2 batches`);
for (const w of ref.windows) console.log(`  window ${w.body} tdbDays ${fmt(w.tdbDaysMedian, 2)}: min distance ${fmt(w.minDistanceKm.min)} km, ${w.impactProbability.phrase}`);

type Figures = { warm: number[]; cold: number[]; cpu: number[] };
const fig: Record<'one' | 'all', Figures> = { one: { warm: [], cold: [], cpu: [] }, all: { warm: [], cold: [], cpu: [] } };
const pools = { one: new McPool(1), all: new McPool(ALL) };
// Warm-up: thread start, tsx, ephemeris build in each worker, JIT.
for (const k of ['one', 'all'] as const) await runMonteCarlo(solution, { ...base, clones: 128 * pools[k].threads, pool: pools[k] });
let check: string | null = null;
for (let rep = 0; rep < REPS; rep++) {
  for (const k of ['one', 'all'] as const) {
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    const r = await runMonteCarlo(solution, { ...base, pool: pools[k] });
    const wall = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(cpu0);
    fig[k].warm.push(r.cloneYears / wall);
    fig[k].cpu.push((cpu.user + cpu.system) / 1e6);
    const sig = JSON.stringify(r.windows.map((w) => [w.hits, w.minDistanceKm]));
    if (check === null) check = sig;
    else if (check !== sig) console.log('  WARNING: results differ between runs');
  }
}
await pools.one.destroy();
await pools.all.destroy();
// End to end with a fresh pool (start-up included), once each.
for (const [k, w] of [['one', 1], ['all', ALL]] as const) {
  const t0 = performance.now();
  const r = await runMonteCarlo(solution, { ...base, workers: w });
  fig[k].cold.push(r.cloneYears / ((performance.now() - t0) / 1000));
}

const cy = CLONES * YEARS;
console.log(`\n${CLONES} clones x ${YEARS} years = ${fmt(cy)} clone-years per run, ${REPS} runs each (median):`);
for (const k of ['one', 'all'] as const) {
  const n = k === 'one' ? 1 : ALL;
  console.log(
    `  ${n} worker${n > 1 ? 's' : ' '}: ${fmt(median(fig[k].warm))} clone-years/s warm pool (runs: ${fig[k].warm.map((x) => fmt(x)).join(', ')}); ` +
      `${fmt(fig[k].cold[0])} with a fresh pool; CPU ${fmt(median(fig[k].cpu), 2)} s per run (${fmt(cy / median(fig[k].cpu))} clone-years per CPU-s)`,
  );
}
const speedups = fig.all.warm.map((x, i) => x / fig.one.warm[i]);
const speedup = median(speedups);
console.log(`  speed-up ${ALL} workers / 1 worker: ${fmt(speedup, 2)} (per run pair: ${speedups.map((x) => fmt(x, 2)).join(', ')})`);

// Linear IP time: LIN's linear method on the same solution (nominal STM, b-plane covariance, IP).
let linearIpSeconds: number | null = null;
try {
  const lin = await import('../../server/engine/assess/linear');
  const m = solution.covariance!.matrix;
  t = performance.now();
  const res = lin.linearAssessment({
    nominal: { epochTdbDays: T0, positionAu: c.positionAu, velocityAuD: c.velocityAuD, nonGrav: null },
    covariance: { names: solution.covariance!.parameters, n: 6, matrix: Float64Array.from(m.flat()) },
    ephemeris: eph,
    untilTdbDays: T1,
    bodies: ['earth', 'moon'],
    maxAu: 0.05,
  });
  linearIpSeconds = (performance.now() - t) / 1000;
  console.log(`\nlinear IP (assess/linear.ts linearAssessment, STM + b-plane + 3-sigma check): ${fmt(linearIpSeconds, 3)} s for ${res.length} approach(es)`);
} catch (err) {
  console.log(`\nlinear IP: not measured (${(err as Error).message})`);
}

const peakRssMb = process.resourceUsage().maxRSS / 1024;
console.log(`peak RSS ${fmt(peakRssMb, 1)} MB (whole process, all threads)`);
console.log(
  JSON.stringify({
    cloneYearsPerSecond: { oneWorker: Math.round(median(fig.one.warm)), allWorkers: Math.round(median(fig.all.warm)) },
    speedup: Math.round(speedup * 100) / 100,
    peakRssMb: Math.round(peakRssMb * 10) / 10,
    linearIpSeconds: linearIpSeconds === null ? null : Math.round(linearIpSeconds * 1000) / 1000,
  }),
);
