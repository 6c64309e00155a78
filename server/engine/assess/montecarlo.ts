/**
 * Plain Monte Carlo impact probability (METHODS.md §6.1, §6.5; issue 4 items 3 and 5).
 *
 * - N virtual asteroids drawn from the solution's Gaussian: the covariance (6x6 state, up to 9x9 with A1-A3) is
 *   validated on its scaled form and factored (linalg/covariance.ts: refused with a CovarianceError naming the
 *   offending eigenvalue and direction, repaired only when opts.repairCovariance is set); clone k uses
 *   RandomStream.forClone(seed, k), so it depends only on (seed, k).
 * - Each clone is propagated with the full dynamics (n-body, GR, non-grav) from the solution epoch to untilTdbDays
 *   with the run's shared ephemeris cache (posted to the workers as shared memory, not rebuilt there), in lockstep batches (assess/batch.ts) of `batchSize` clones; a task is
 *   one batch (a contiguous block of clone indices, cut at multiples of batchSize whatever the number of workers).
 * - Streamed: a task returns only the clones' approaches (compact records), never their states; memory is bounded
 *   by the number of approaches.
 * - Workers: a piscina pool (jobs/pool.ts) with opts.workers threads (default every core); workers: 0 runs the
 *   tasks in this thread (same code, same results).
 * - After merging in clone order, approaches are grouped into windows (assess/windows.ts) and each window gets
 *   hits / samples with binomialEstimate (Wilson 95%; zero hits reported as the one-sided upper bound, not 0).
 * Results are identical for a given seed whatever the number of workers (tested).
 *
 * Tolerance: IAS15 epsilon 1e-9 by default (REBOUND's default; the accuracy the tests state). Measured by
 * tests/bench/mc.ts on its deep-encounter case (20,000 km Earth pass, 16 clones against an epsilon 1e-12 batch over
 * 10 years): epsilon 1e-9 gets the encounter distance right to 0.2 m and ends 24 km off after the encounter;
 * 1e-10 gives 0.3 km at the end for 31% more lockstep steps. The encounter decides the hits, and 24 km is far
 * below the clones' spread after a deep encounter, so the Monte Carlo keeps 1e-9; pass `tolerance` for more.
 */
import { setMaxListeners } from 'node:events';
import { ChebyshevEphemeris, EPHEMERIS_BODIES } from '../ephemeris';
import { validateCovariance, type CovarianceRepair } from '../linalg/covariance';
import { MC_PARAMETERS, runMcTask, type McTask, type McTaskResult } from '../jobs/mc-task';
import { McPool, defaultWorkerCount } from '../jobs/pool';
import type { AssessOptions, McHooks, McProgress, McResult, OrbitSolution } from './types';
import { groupWindows, type CloneApproach, type McWindowDetail, type WindowOptions } from './windows';

export const DEFAULT_BATCH_SIZE = 128;
/** Predictor-corrector iterations per lockstep step (METHODS.md §4.5). */
export const DEFAULT_FIXED_ITERATIONS = 2;

export type McOptions = AssessOptions & {
  ephemeris?: ChebyshevEphemeris;
  /** Clones per lockstep batch (= per task). Part of the run's definition: changing it changes the step sequence. */
  batchSize?: number;
  fixedIterations?: number;
  window?: WindowOptions;
  /** A long-lived pool to run on (not destroyed here); otherwise a pool of opts.workers threads is made for the run. */
  pool?: McPool;
};

export type McRunResult = Omit<McResult, 'windows'> & {
  windows: McWindowDetail[];
  method: string;
  clonesWithImpact: number;
  batchSize: number;
  workers: number;
  covarianceRepair: CovarianceRepair | null;
  /** Propagated span of one clone, years, and the run's clone-years. */
  cloneYears: number;
  wallSeconds: number;
  /** Sum over tasks of lockstep steps and batch force evaluations. */
  steps: number;
  forceEvaluations: number;
};

export class McAbortError extends Error {
  constructor() {
    super('Monte Carlo run cancelled');
    this.name = 'AbortError';
  }
}

/** Build the task template (everything but the clone range) from the solution and options. */
export function prepareMcTasks(solution: OrbitSolution, opts: McOptions, ephemerisSpan: [number, number]): { template: Omit<McTask, 'cloneStart' | 'cloneEnd'>; repair: CovarianceRepair | null } {
  const cov = solution.covariance;
  if (!cov) throw new Error('Monte Carlo needs a covariance: the orbit solution has none');
  const names = cov.parameters;
  const paramIndex = names.map((p) => MC_PARAMETERS.indexOf(p));
  if (new Set(paramIndex).size !== paramIndex.length) throw new Error(`covariance parameters repeat: ${names.join(', ')}`);
  const v = validateCovariance(cov.matrix, { names, repair: opts.repairCovariance ?? false });
  const ng = solution.nonGrav;
  const nominal = [...solution.positionAu, ...solution.velocityAuD, ng?.a1 ?? 0, ng?.a2 ?? 0, ng?.a3 ?? 0];
  const ngInCov = paramIndex.some((i) => i >= 6);
  const nonGravMode: McTask['nonGravMode'] = ngInCov ? 'per-clone' : ng && (ng.a1 !== 0 || ng.a2 !== 0 || ng.a3 !== 0) ? 'nominal' : 'none';
  return {
    repair: v.repair,
    template: {
      ephemerisSpan,
      fromTdbDays: solution.epochTdbDays,
      untilTdbDays: opts.untilTdbDays,
      nominal,
      paramIndex,
      lower: Array.from(v.cholesky),
      nonGravLaw: ng?.law ?? 'inverse-square',
      nonGravMode,
      seed: opts.seed,
      bodies: opts.bodies,
      maxAu: opts.maxAu,
      tolerance: opts.tolerance ?? 1e-9,
      fixedIterations: opts.fixedIterations ?? DEFAULT_FIXED_ITERATIONS,
    },
  };
}

function toApproaches(results: McTaskResult[]): CloneApproach[] {
  const out: CloneApproach[] = [];
  for (const r of results) {
    for (let i = 0; i < r.clone.length; i++) {
      const xi = r.xiKm[i], zeta = r.zetaKm[i], vi = r.vInfinityKmS[i];
      out.push({
        clone: r.clone[i],
        body: EPHEMERIS_BODIES[r.body[i]],
        tdbDays: r.tdbDays[i],
        distanceKm: r.distanceKm[i],
        xiKm: Number.isNaN(xi) ? null : xi,
        zetaKm: Number.isNaN(zeta) ? null : zeta,
        vInfinityKmS: Number.isNaN(vi) ? null : vi,
        impact: r.impact[i] === 1,
      });
    }
  }
  return out;
}

export async function runMonteCarlo(solution: OrbitSolution, opts: McOptions, hooks: McHooks = {}): Promise<McRunResult> {
  const N = opts.clones;
  if (!Number.isInteger(N) || N < 1) throw new RangeError(`clones must be a positive integer, got ${N}`);
  const batchSize = opts.batchSize ?? DEFAULT_BATCH_SIZE;
  if (!Number.isInteger(batchSize) || batchSize < 1) throw new RangeError(`batchSize must be a positive integer, got ${batchSize}`);
  const from = solution.epochTdbDays, until = opts.untilTdbDays;
  if (!(until !== from)) throw new RangeError('untilTdbDays must differ from the solution epoch');
  const signal = hooks.signal;
  if (signal?.aborted) throw new McAbortError();
  const eph = opts.ephemeris ?? ChebyshevEphemeris.build(Math.min(from, until) - 1, Math.max(from, until) + 1);
  const span: [number, number] = [eph.startTdbDays, eph.endTdbDays];
  const { template, repair } = prepareMcTasks(solution, opts, span);

  const workers = opts.pool ? opts.pool.threads : (opts.workers ?? defaultWorkerCount());
  // Workers receive the run's cache as shared memory instead of rebuilding it (jobs/mc-worker.ts).
  const shared = workers > 0 ? eph.exportShared() : undefined;
  const tasks: McTask[] = [];
  for (let k = 0; k < N; k += batchSize) tasks.push({ ...template, ephemeris: shared, cloneStart: k, cloneEnd: Math.min(N, k + batchSize) });
  const t0 = performance.now();
  let done = 0;
  const progress = (): McProgress => {
    const el = (performance.now() - t0) / 1000;
    const rate = el > 0 ? done / el : 0;
    return { done, total: N, rateClonesPerS: rate, etaS: done === 0 || rate === 0 ? null : (N - done) / rate };
  };
  hooks.onProgress?.(progress());
  const results: McTaskResult[] = new Array(tasks.length);

  if (workers === 0) {
    for (let i = 0; i < tasks.length; i++) {
      // Yield so that an abort requested by the caller can be seen between tasks.
      await new Promise((r) => setImmediate(r));
      if (signal?.aborted) throw new McAbortError();
      results[i] = runMcTask(tasks[i], eph);
      done += tasks[i].cloneEnd - tasks[i].cloneStart;
      hooks.onProgress?.(progress());
    }
  } else {
    const pool = opts.pool ?? new McPool(workers);
    const inner = new AbortController();
    // The pool listens on the signal once per queued task.
    setMaxListeners(tasks.length + 16, inner.signal);
    const onAbort = () => inner.abort();
    signal?.addEventListener('abort', onAbort, { once: true });
    try {
      await Promise.all(
        tasks.map(async (task, i) => {
          const r = await pool.run(task, inner.signal);
          results[i] = r;
          done += task.cloneEnd - task.cloneStart;
          if (!inner.signal.aborted) hooks.onProgress?.(progress());
        }),
      );
    } catch (err) {
      inner.abort();
      if (signal?.aborted) throw new McAbortError();
      throw err;
    } finally {
      signal?.removeEventListener('abort', onAbort);
      if (!opts.pool) await pool.destroy();
    }
    if (signal?.aborted) throw new McAbortError();
  }

  const approaches = toApproaches(results);
  const windows = groupWindows(approaches, N, opts.window);
  return {
    samples: N,
    seed: opts.seed,
    windows,
    method: `plain Monte Carlo: ${N} clones from the validated covariance (seed ${opts.seed}), full n-body dynamics, lockstep batches of ${batchSize} (IAS15 epsilon ${template.tolerance}, ${template.fixedIterations} predictor-corrector iterations per step); Wilson 95% intervals, zero hits as a one-sided 95% upper bound`,
    clonesWithImpact: results.reduce((s, r) => s + r.impacts, 0),
    batchSize,
    workers,
    covarianceRepair: repair,
    cloneYears: (N * Math.abs(until - from)) / 365.25,
    wallSeconds: (performance.now() - t0) / 1000,
    steps: results.reduce((s, r) => s + r.steps, 0),
    forceEvaluations: results.reduce((s, r) => s + r.forceEvaluations, 0),
  };
}
