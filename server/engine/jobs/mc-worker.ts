/**
 * Worker-thread entry for Monte Carlo tasks (piscina; loaded through tsx, see pool.ts).
 *
 * Ephemeris: the parent posts the run's Chebyshev cache with every task as shared data (ChebyshevEphemeris
 * exportShared: the coefficients live in a SharedArrayBuffer, so posting costs no copy); the worker wraps it once per
 * run (keyed by the export's id) and keeps it while tasks of the same run arrive. Same coefficients, same numbers as
 * in the parent. A task without it (older callers) makes the worker build the cache for the task's span, once per
 * span; the cache is cut on a J2000-anchored granule grid, so those coefficients are the same numbers too.
 */
import { ChebyshevEphemeris } from '../ephemeris';
import { runMcTask, type McTask, type McTaskResult } from './mc-task';

let cached: { key: string; eph: ChebyshevEphemeris; buildMs: number } | null = null;

function ephemerisFor(task: McTask): { eph: ChebyshevEphemeris; fresh: boolean } {
  const span = task.ephemerisSpan;
  const key = task.ephemeris ? `shared:${task.ephemeris.id}` : `${span[0]}:${span[1]}`;
  if (cached && cached.key === key) return { eph: cached.eph, fresh: false };
  const t0 = performance.now();
  const eph = task.ephemeris ? ChebyshevEphemeris.fromData(task.ephemeris) : ChebyshevEphemeris.build(span[0], span[1]);
  cached = { key, eph, buildMs: performance.now() - t0 };
  return { eph, fresh: true };
}

export default function mcWorker(task: McTask): McTaskResult & { ephemerisBuildMs: number } {
  const { eph, fresh } = ephemerisFor(task);
  const res = runMcTask(task, eph);
  return { ...res, ephemerisBuildMs: fresh ? cached!.buildMs : 0 };
}
