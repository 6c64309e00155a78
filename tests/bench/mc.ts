/**
 * Monte Carlo benchmark (`npm run bench:mc`): prints figures, asserts nothing (issue 4 item 9).
 *
 * Two invented cases (tests/bench/mc-cases.ts), each 1024 clones x 10 years (MC_BENCH_CLONES, MC_BENCH_YEARS):
 *  - 'nea'  a typical near-Earth orbit (a ~ 1.1 AU, e ~ 0.2), closest approach ~0.03 AU: no deep encounter;
 *  - 'deep' a ~ 1.5 AU, e ~ 0.4 orbit passing ~20,000 km from the Earth's centre 5 years in, clones from a
 *    100 km / 0.01 m/s covariance: the batch goes through the encounter together and some clones hit.
 * IAS15 epsilon 1e-9 (the Monte Carlo default; the tests' accuracy requirements are stated at it), 2
 * predictor-corrector iterations per step, lockstep batches of 128, Earth and Moon monitored.
 *
 * Per case, one worker and all workers (os.availableParallelism()) on long-lived pools (threads started, tsx loaded,
 * JIT warm, as in a server), run alternately on the same case in the same process, MC_BENCH_REPS runs each:
 *  - clone-years per second by wall clock (median), and clone-years per CPU-second of the whole process (all threads,
 *    process.cpuUsage; median): the machine is shared, so the CPU figure is the one that does not depend on the load;
 *  - speed-up = all-worker rate / one-worker rate of the SAME repetition (pairs run back to back), median of the pairs;
 *  - results checked identical between one and all workers.
 * Then: the ephemeris hand-over to the workers (exported once as shared memory instead of a rebuild per worker),
 * a fresh pool end to end (start-up included), epsilon 1e-10 vs 1e-9 (speed, and accuracy of a 16-clone batch
 * against an epsilon-1e-12 batch), the linear impact-probability time, and peak RSS.
 * Last line: one JSON object {"cloneYearsPerSecond":{"oneWorker","allWorkers"},"speedup","peakRssMb","linearIpSeconds",...}
 * whose headline figures are those of the deep-encounter case (the harder one); per-case figures follow in "cases".
 */
import os from 'node:os';
import { integrateBatch } from '../../server/engine/assess/batch';
import { runMonteCarlo, type McOptions, type McRunResult } from '../../server/engine/assess/montecarlo';
import { AU_KM } from '../../server/engine/constants';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import { McPool } from '../../server/engine/jobs/pool';
import { benchCase } from './mc-cases';

const T0 = 10957.5; // 2030-01-01 12:00 TDB
const YEARS = Number(process.env.MC_BENCH_YEARS ?? 10);
const T1 = T0 + YEARS * 365.25;
const CLONES = Number(process.env.MC_BENCH_CLONES ?? 1024);
const REPS = Number(process.env.MC_BENCH_REPS ?? 3);
const ALL = os.availableParallelism();
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length === 0 ? NaN : s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};
const fmt = (x: number, d = 0) => x.toLocaleString('en-US', { maximumFractionDigits: d, minimumFractionDigits: d });
const cpuSeconds = (c: NodeJS.CpuUsage) => (c.user + c.system) / 1e6;
const load = () => os.loadavg().map((x) => x.toFixed(1)).join(' ');

console.log(`Tocsin Monte Carlo benchmark (Node ${process.version}, ${ALL} cores, load average ${load()})`);
let t = performance.now();
const eph = ChebyshevEphemeris.build(T0 - 1, T1 + 1, { useMemo: false });
const buildS = (performance.now() - t) / 1000;
t = performance.now();
const exported = eph.exportShared();
const exportMs = performance.now() - t;
t = performance.now();
ChebyshevEphemeris.fromData(structuredClone(exported));
const importMs = performance.now() - t;
console.log(
  `ephemeris: ${YEARS} years built in ${fmt(buildS, 2)} s; workers now receive it as shared memory ` +
    `(${fmt(exported.coeffs.byteLength / 1e6, 2)} MB copied once into a SharedArrayBuffer in ${fmt(exportMs, 1)} ms, ${fmt(importMs, 2)} ms to wrap in a worker) ` +
    `instead of rebuilding it (${fmt(buildS, 2)} s per worker and run before).`,
);

const base = (kind: 'nea' | 'deep'): { solution: ReturnType<typeof benchCase>['solution']; opts: McOptions } => {
  const { solution, bodies } = benchCase(kind, eph, T0, YEARS);
  return { solution, opts: { untilTdbDays: T1, methods: ['mc'], clones: CLONES, seed: 1, bodies, maxAu: 0.05, analysisTdbDays: T0, ephemeris: eph } };
};
const cases = { nea: base('nea'), deep: base('deep') };
const pools = { one: new McPool(1), all: new McPool(ALL) };
const signature = (r: McRunResult) => JSON.stringify(r.windows.map((w) => [w.body, w.hits, w.minDistanceKm, w.tdbDaysMedian]));

// Warm-up: thread start, tsx, JIT. Each worker compiles the code itself, and a cold worker needs ~2x the CPU for its
// first batches (measured with mc-profile.ts), so every pool first runs one full run of each case.
for (const k of ['one', 'all'] as const) {
  for (const kind of ['nea', 'deep'] as const) await runMonteCarlo(cases[kind].solution, { ...cases[kind].opts, pool: pools[k] });
}

type Fig = { wall: number[]; cpu: number[]; steps: number };
type CaseFig = { one: Fig; all: Fig; speedups: number[]; summary: string; identical: boolean };
const figs: Record<'nea' | 'deep', CaseFig> = {} as Record<'nea' | 'deep', CaseFig>;
const cy = CLONES * YEARS;
for (const kind of ['nea', 'deep'] as const) {
  const f: CaseFig = { one: { wall: [], cpu: [], steps: 0 }, all: { wall: [], cpu: [], steps: 0 }, speedups: [], summary: '', identical: true };
  let sig: string | null = null;
  for (let rep = 0; rep < REPS; rep++) {
    const rate: Record<string, number> = {};
    for (const k of ['one', 'all'] as const) {
      const cpu0 = process.cpuUsage();
      const t0 = performance.now();
      const r = await runMonteCarlo(cases[kind].solution, { ...cases[kind].opts, pool: pools[k] });
      const wall = (performance.now() - t0) / 1000;
      const cpu = cpuSeconds(process.cpuUsage(cpu0));
      f[k].wall.push(wall);
      f[k].cpu.push(cpu);
      f[k].steps = r.steps;
      rate[k] = r.cloneYears / wall;
      const s = signature(r);
      if (sig === null) {
        sig = s;
        const hits = r.windows.reduce((a, w) => a + w.hits, 0);
        const minKm = Math.min(...r.windows.filter((w) => w.body === 'earth').map((w) => w.minDistanceKm.min));
        f.summary = `${r.windows.length} windows, closest Earth approach ${fmt(minKm)} km, ${hits} hits of ${CLONES}, ${fmt(r.steps / Math.ceil(CLONES / r.batchSize))} lockstep steps per batch`;
      } else if (s !== sig) f.identical = false;
    }
    f.speedups.push(rate.all / rate.one);
  }
  figs[kind] = f;
  console.log(`\ncase '${kind}': ${CLONES} clones x ${YEARS} years = ${fmt(cy)} clone-years per run; ${f.summary}; load average now ${load()}`);
  for (const k of ['one', 'all'] as const) {
    const n = k === 'one' ? 1 : ALL;
    console.log(
      `  ${n} worker${n > 1 ? 's' : ' '}: ${fmt(cy / median(f[k].wall))} clone-years/s by wall (runs ${f[k].wall.map((w) => fmt(cy / w)).join(', ')}); ` +
        `CPU ${fmt(median(f[k].cpu), 2)} s per run = ${fmt(cy / median(f[k].cpu))} clone-years per CPU-second; wall/CPU ${fmt(median(f[k].wall) / median(f[k].cpu), 2)}`,
    );
  }
  console.log(`  speed-up ${ALL} workers / 1 worker (same repetition): ${fmt(median(f.speedups), 2)} (pairs: ${f.speedups.map((x) => fmt(x, 2)).join(', ')}); results ${f.identical ? 'identical' : 'DIFFER'} between runs and worker counts`);
}

// Epsilon: speed (all workers, the warm pool) and accuracy of a small batch against epsilon 1e-12.
const epsRows: Record<string, { rate: number; cpuRate: number; errKm: number; encErrKm: number; steps: number }> = {};
{
  const pool = pools.all; // warm
  const B = 16;
  const ref = cases.deep.solution;
  const x = new Float64Array(3 * B), v = new Float64Array(3 * B);
  for (let i = 0; i < B; i++) {
    for (let k = 0; k < 3; k++) {
      x[3 * i + k] = ref.positionAu[k] + ((i - B / 2) * 20 * (k === i % 3 ? 1 : 0)) / AU_KM;
      v[3 * i + k] = ref.velocityAuD[k];
    }
  }
  const batch = (eps: number) =>
    integrateBatch({ ephemeris: eph, fromTdbDays: T0, untilTdbDays: T1, positionsAu: x, velocitiesAuD: v, bodies: ['earth', 'moon'], maxAu: 0.05, tolerance: eps });
  const truth = batch(1e-12);
  for (const eps of [1e-9, 1e-10]) {
    const cpu0 = process.cpuUsage();
    const t0 = performance.now();
    const r = await runMonteCarlo(cases.deep.solution, { ...cases.deep.opts, tolerance: eps, pool });
    const wall = (performance.now() - t0) / 1000;
    const cpu = cpuSeconds(process.cpuUsage(cpu0));
    const b = batch(eps);
    let errKm = 0, encErrKm = 0;
    for (let i = 0; i < B; i++) {
      const p = b.clones[i], q = truth.clones[i];
      if (!p.impact && !q.impact) errKm = Math.max(errKm, Math.hypot(p.positionAu[0] - q.positionAu[0], p.positionAu[1] - q.positionAu[1], p.positionAu[2] - q.positionAu[2]) * AU_KM);
      const ea = p.approaches.find((a) => a.body === 'earth'), eb = q.approaches.find((a) => a.body === 'earth');
      if (ea && eb) encErrKm = Math.max(encErrKm, Math.abs(ea.distanceKm - eb.distanceKm));
    }
    epsRows[String(eps)] = { rate: r.cloneYears / wall, cpuRate: r.cloneYears / cpu, errKm, encErrKm, steps: r.steps };
  }
  await pools.one.destroy();
  await pools.all.destroy();
  console.log(`\nepsilon (deep case, ${ALL} workers; accuracy of ${B} clones 20 km apart vs an epsilon-1e-12 batch after ${YEARS} years):`);
  for (const [eps, r] of Object.entries(epsRows)) {
    console.log(`  ${eps}: ${fmt(r.steps)} lockstep steps in all batches, ${fmt(r.rate)} clone-years/s by wall, ${fmt(r.cpuRate)} per CPU-second; final position error max ${fmt(r.errKm, 3)} km, encounter distance error max ${fmt(r.encErrKm, 4)} km`);
  }
}

// Fresh pool end to end (thread start and tsx included), all workers, deep case, once (after the warm pools are gone).
{
  const t0 = performance.now();
  const r = await runMonteCarlo(cases.deep.solution, { ...cases.deep.opts, workers: ALL });
  const wall = (performance.now() - t0) / 1000;
  console.log(`\nfresh pool of ${ALL} workers, deep case end to end: ${fmt(wall, 2)} s (${fmt(r.cloneYears / wall)} clone-years/s incl. start-up)`);
}

// Linear IP time: the linear method on the deep case (nominal STM, b-plane covariance, IP).
let linearIpSeconds: number | null = null;
try {
  const lin = await import('../../server/engine/assess/linear');
  const s = cases.deep.solution;
  t = performance.now();
  const res = lin.linearAssessment({
    nominal: { epochTdbDays: T0, positionAu: s.positionAu, velocityAuD: s.velocityAuD, nonGrav: null },
    covariance: { names: s.covariance!.parameters, n: 6, matrix: Float64Array.from(s.covariance!.matrix.flat()) },
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
const perCase = (f: CaseFig) => ({
  cloneYearsPerSecond: { oneWorker: Math.round(cy / median(f.one.wall)), allWorkers: Math.round(cy / median(f.all.wall)) },
  cpuCloneYearsPerSecond: { oneWorker: Math.round(cy / median(f.one.cpu)), allWorkers: Math.round(cy / median(f.all.cpu)) },
  speedup: Math.round(median(f.speedups) * 100) / 100,
  identical: f.identical,
});
const deep = perCase(figs.deep);
console.log(
  JSON.stringify({
    cloneYearsPerSecond: deep.cloneYearsPerSecond,
    speedup: deep.speedup,
    peakRssMb: Math.round(peakRssMb * 10) / 10,
    linearIpSeconds: linearIpSeconds === null ? null : Math.round(linearIpSeconds * 1000) / 1000,
    cpuCloneYearsPerSecond: deep.cpuCloneYearsPerSecond,
    headlineCase: 'deep',
    cases: { nea: perCase(figs.nea), deep },
    epsilon: Object.fromEntries(Object.entries(epsRows).map(([k, r]) => [k, { cloneYearsPerSecond: Math.round(r.rate), cpuCloneYearsPerSecond: Math.round(r.cpuRate), finalErrorKm: Number(r.errKm.toPrecision(3)), encounterErrorKm: Number(r.encErrKm.toPrecision(3)) }])),
    loadAverage: os.loadavg().map((x) => Math.round(x * 10) / 10),
  }),
);
