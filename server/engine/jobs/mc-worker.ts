/**
 * Worker-thread entry for Monte Carlo tasks (piscina; loaded through tsx, see pool.ts).
 *
 * Ephemeris: each worker builds the run's Chebyshev cache once (kept while the span stays the same) rather than
 * receiving it from the parent. The cache is cut on a J2000-anchored granule grid, so the worker's coefficients
 * are the same numbers as the parent's for the same span (results do not depend on where the cache was built).
 * Cost measured by tests/bench/mc.ts (printed there): the build is ~0.035 s of CPU per simulated year, once per
 * worker and run, against a structured-clone copy of ~1 MB of coefficients that would need access to the
 * cache's private arrays (owned by the ephemeris module); building avoids coupling to those internals.
 */
import { ChebyshevEphemeris } from '../ephemeris';
import { runMcTask, type McTask, type McTaskResult } from './mc-task';

let cached: { key: string; eph: ChebyshevEphemeris; buildMs: number } | null = null;

function ephemerisFor(span: [number, number]): ChebyshevEphemeris {
  const key = `${span[0]}:${span[1]}`;
  if (!cached || cached.key !== key) {
    const t0 = performance.now();
    const eph = ChebyshevEphemeris.build(span[0], span[1]);
    cached = { key, eph, buildMs: performance.now() - t0 };
  }
  return cached.eph;
}

export default function mcWorker(task: McTask): McTaskResult & { ephemerisBuildMs: number } {
  const fresh = !cached || cached.key !== `${task.ephemerisSpan[0]}:${task.ephemerisSpan[1]}`;
  const eph = ephemerisFor(task.ephemerisSpan);
  const res = runMcTask(task, eph);
  return { ...res, ephemerisBuildMs: fresh ? cached!.buildMs : 0 };
}
