/**
 * One Monte Carlo task: a contiguous block of clone indices [cloneStart, cloneEnd), drawn and integrated as ONE
 * lockstep batch (assess/batch.ts). Runs the same way in a worker thread (mc-worker.ts) and in-process.
 *
 * Clone k: z ~ N(0, I) from RandomStream.forClone(seed, k) (risk/random.ts), x_k = mean + L z (risk/sampling.ts),
 * with L the Cholesky factor of the validated covariance (linalg/covariance.ts). So clone k's initial state depends
 * only on (seed, k). Batches are cut at fixed multiples of the batch size by the caller, so the batch a clone
 * belongs to (and thus the shared step sequence) does not depend on the number of workers either: results are
 * identical for a given seed whatever the number of workers.
 *
 * Parameters: the covariance rows are any of x, y, z, vx, vy, vz (AU, AU/d) and a1, a2, a3 (AU/d^2); parameters
 * not in the covariance keep their nominal value in every clone. When a1-a3 are in the covariance each clone gets
 * its own non-gravitational parameters (law of the solution, 'inverse-square' if the solution has none).
 */
import { integrateBatch } from '../assess/batch';
import { EPHEMERIS_BODIES, type EphemerisBody } from '../ephemeris';
import type { NonGravParams, PlanetEphemeris } from '../dynamics/types';
import type { ChebyshevEphemerisData } from '../ephemeris/chebyshev';
import { RandomStream } from '../risk/random';
import { drawGaussian } from '../risk/sampling';

/** Order of the nominal vector: state then non-gravitational parameters. */
export const MC_PARAMETERS = ['x', 'y', 'z', 'vx', 'vy', 'vz', 'a1', 'a2', 'a3'] as const;
export type McParameter = (typeof MC_PARAMETERS)[number];

export type McTask = {
  /** Ephemeris span of the run's cache (a worker builds it only when `ephemeris` is absent). */
  ephemerisSpan: [number, number];
  /**
   * The run's ephemeris cache as shared data (ChebyshevEphemeris.exportShared: coefficients in a
   * SharedArrayBuffer, posted without copying); a worker uses it instead of rebuilding the cache.
   */
  ephemeris?: ChebyshevEphemerisData;
  fromTdbDays: number;
  untilTdbDays: number;
  /** Nominal x, y, z, vx, vy, vz, a1, a2, a3. */
  nominal: number[];
  /** Index into `nominal` of each covariance row. */
  paramIndex: number[];
  /** Lower-triangular Cholesky factor (n x n, row-major) of the covariance. */
  lower: number[];
  /** Non-grav law, and whether clones carry non-gravitational parameters at all. */
  nonGravLaw: NonGravParams['law'];
  nonGravMode: 'none' | 'nominal' | 'per-clone';
  seed: number;
  cloneStart: number;
  cloneEnd: number;
  bodies: EphemerisBody[];
  maxAu: number;
  tolerance: number;
  fixedIterations: number;
};

/** Approaches of the block as parallel arrays (cheap to pass between threads). */
export type McTaskResult = {
  cloneStart: number;
  cloneEnd: number;
  clone: number[];
  body: number[];
  tdbDays: number[];
  distanceKm: number[];
  /** NaN when there is no b-plane (bound planet-centred orbit). */
  xiKm: number[];
  zetaKm: number[];
  vInfinityKmS: number[];
  impact: number[];
  impacts: number;
  steps: number;
  forceEvaluations: number;
  /** Wall time of the task in its thread, ms. */
  wallMs: number;
};

/** Draw clone k's parameters into out (length 9, in MC_PARAMETERS order). */
export function drawClone(task: Pick<McTask, 'nominal' | 'paramIndex' | 'lower' | 'seed'>, k: number, out: Float64Array, scratch: { mean: Float64Array; x: Float64Array; z: Float64Array }): void {
  const n = task.paramIndex.length;
  for (let i = 0; i < 9; i++) out[i] = task.nominal[i];
  for (let i = 0; i < n; i++) scratch.mean[i] = task.nominal[task.paramIndex[i]];
  const stream = RandomStream.forClone(task.seed, k);
  drawGaussian(scratch.mean, lowerArray(task), n, stream, scratch.x, scratch.z);
  for (let i = 0; i < n; i++) out[task.paramIndex[i]] = scratch.x[i];
}

const lowerCache = new WeakMap<object, Float64Array>();
function lowerArray(task: Pick<McTask, 'lower'>): Float64Array {
  let l = lowerCache.get(task.lower);
  if (!l) lowerCache.set(task.lower, (l = Float64Array.from(task.lower)));
  return l;
}

export function runMcTask(task: McTask, ephemeris: PlanetEphemeris): McTaskResult {
  const t0 = performance.now();
  const m = task.cloneEnd - task.cloneStart;
  const x = new Float64Array(3 * m), v = new Float64Array(3 * m), ng = new Float64Array(3 * m);
  const n = task.paramIndex.length;
  const scratch = { mean: new Float64Array(n), x: new Float64Array(n), z: new Float64Array(n) };
  const p = new Float64Array(9);
  for (let i = 0; i < m; i++) {
    drawClone(task, task.cloneStart + i, p, scratch);
    for (let c = 0; c < 3; c++) {
      x[3 * i + c] = p[c];
      v[3 * i + c] = p[3 + c];
      ng[3 * i + c] = p[6 + c];
    }
  }
  const nonGrav =
    task.nonGravMode === 'none'
      ? null
      : task.nonGravMode === 'nominal'
        ? { a1: task.nominal[6], a2: task.nominal[7], a3: task.nominal[8], law: task.nonGravLaw }
        : { law: task.nonGravLaw, perParticle: ng };
  const res = integrateBatch({
    ephemeris,
    fromTdbDays: task.fromTdbDays,
    untilTdbDays: task.untilTdbDays,
    positionsAu: x,
    velocitiesAuD: v,
    nonGrav,
    bodies: task.bodies,
    maxAu: task.maxAu,
    tolerance: task.tolerance,
    fixedIterations: task.fixedIterations,
  });
  const out: McTaskResult = {
    cloneStart: task.cloneStart,
    cloneEnd: task.cloneEnd,
    clone: [], body: [], tdbDays: [], distanceKm: [], xiKm: [], zetaKm: [], vInfinityKmS: [], impact: [],
    impacts: 0,
    steps: res.steps,
    forceEvaluations: res.forceEvaluations,
    wallMs: 0,
  };
  res.clones.forEach((c, i) => {
    if (c.impact) out.impacts++;
    for (const a of c.approaches) {
      out.clone.push(task.cloneStart + i);
      out.body.push(EPHEMERIS_BODIES.indexOf(a.body));
      out.tdbDays.push(a.tdbDays);
      out.distanceKm.push(a.distanceKm);
      out.xiKm.push(a.bPlane ? a.bPlane.xiKm : NaN);
      out.zetaKm.push(a.bPlane ? a.bPlane.zetaKm : NaN);
      out.vInfinityKmS.push(a.vInfinityKmS ?? NaN);
      out.impact.push(a.impact ? 1 : 0);
    }
  });
  out.wallMs = performance.now() - t0;
  return out;
}
