/**
 * Single-thread Monte Carlo profile run (`npx tsx tests/bench/mc-profile.ts [deep|nea] [clones] [years] [eps]`):
 * one or more lockstep batches in this thread, wall and CPU time per clone-year, steps and force evaluations.
 * Use with `node --import tsx --cpu-prof tests/bench/mc-profile.ts` to see where time goes. Prints figures only.
 */
import { runMonteCarlo } from '../../server/engine/assess/montecarlo';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import { benchCase } from './mc-cases';

const kind = (process.argv[2] ?? 'deep') as 'deep' | 'nea';
const clones = Number(process.argv[3] ?? 256);
const years = Number(process.argv[4] ?? 10);
const eps = Number(process.argv[5] ?? 1e-9);
const T0 = 10957.5;
const T1 = T0 + years * 365.25;
const eph = ChebyshevEphemeris.build(T0 - 1, T1 + 1);
const { solution, bodies } = benchCase(kind, eph, T0, years);
for (let rep = 0; rep < Number(process.env.REPS ?? 2); rep++) {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const r = await runMonteCarlo(solution, { untilTdbDays: T1, methods: ['mc'], clones, seed: 1, bodies, maxAu: 0.05, analysisTdbDays: T0, ephemeris: eph, workers: 0, tolerance: eps, batchSize: Number(process.env.BATCH ?? 128) });
  const wall = (performance.now() - t0) / 1000;
  const c = process.cpuUsage(cpu0);
  const cpu = (c.user + c.system) / 1e6;
  console.log(
    `${kind} ${clones} clones x ${years} y eps ${eps}: wall ${wall.toFixed(2)} s (${Math.round(r.cloneYears / wall)} clone-years/s), ` +
      `CPU ${cpu.toFixed(2)} s (${Math.round(r.cloneYears / cpu)} clone-years/CPU-s); steps ${r.steps}, force evals ${r.forceEvaluations}, ` +
      `${((cpu / (r.forceEvaluations * 128)) * 1e9).toFixed(0)} ns CPU per clone-evaluation (128-clone batches); hits ${r.clonesWithImpact}; ` +
      r.windows.map((w) => `${w.body}@${w.tdbDaysMedian.toFixed(1)} min ${Math.round(w.minDistanceKm.min)} km hits ${w.hits}`).join('; '),
  );
}
