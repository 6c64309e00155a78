// The assessment-run kind of the durable job runner (server/services/jobs/leaseRunner.ts holds the queue mechanics
// shared with orbit fits: atomic claim, lease heartbeat, fencing, recovery after a crash, clean stop).
// This file does the work of one run: load the solution version, run the engine's assess() in a worker thread
// (executor.ts), write progress with an ETA, and store the result, provenance and the object's summary columns,
// every write fenced on the run's lease. `concurrency` runs at a time (default 1: 2 cores).
import os from 'node:os';
import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { assessmentRuns, orbitSolutions, trackedObjects, type AssessmentRunRow } from '../../db/schema';
import type { AssessOptions } from '../../engine/assess';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import type { RunOptions, RunProvenance } from '../../../shared/schemas/runs';
import { createLeaseRunner, throttledProgress, type JobContext, type LeaseRunnerOptions } from '../jobs/leaseRunner';
import { workerExecutor, type Executor, type ExecutorProgress } from './executor';
import type { RunService } from './service';
import { objectRiskSummary } from './summary';

export { defaultOwner } from '../jobs/leaseRunner';

export interface RunnerOptions extends LeaseRunnerOptions {
  /** Least time between two progress writes of one run (default 500 ms). */
  progressWriteMs?: number;
  executor?: Executor;
}

export function createRunner(db: Db, runs: RunService, opts: RunnerOptions = {}) {
  const progressWriteMs = opts.progressWriteMs ?? 500;
  const execute = opts.executor ?? workerExecutor;
  const log = opts.log ?? ((m: string) => console.log(`[runs] ${m}`));

  async function executeRun({ id: runId, attempt, owner, signal }: JobContext): Promise<void> {
    const mine = () => and(eq(assessmentRuns.id, runId), eq(assessmentRuns.leaseOwner, owner), eq(assessmentRuns.status, 'running'));
    const row = db.select().from(assessmentRuns).where(eq(assessmentRuns.id, runId)).get() as AssessmentRunRow;
    const solution = db.select().from(orbitSolutions).where(eq(orbitSolutions.id, row.solutionId)).get();
    const object = db.select({ designation: trackedObjects.designation }).from(trackedObjects).where(eq(trackedObjects.id, row.objectId)).get();
    const options = JSON.parse(row.optionsJson) as RunOptions;
    const provenanceBase: RunProvenance = {
      objectId: row.objectId,
      designation: object?.designation ?? '',
      solutionId: row.solutionId,
      solutionVersion: row.solutionVersion,
      inputSha256: row.inputSha256,
      methods: options.methods,
      // as the engine reports them: null when no Monte Carlo runs (the requested values stay in the options)
      clones: options.methods.includes('mc') ? options.clones : null,
      seed: options.methods.includes('mc') ? options.seed : null,
      until: options.until,
      untilTdbDays: options.untilTdbDays,
      bodies: options.bodies,
      maxAu: options.maxAu,
      analysisUtc: options.analysisUtc,
      attempt,
      runner: owner,
    };
    db.update(assessmentRuns).set({ provenanceJson: JSON.stringify(provenanceBase), progressStage: 'starting', progressTotal: 1 }).where(mine()).run();

    if (!solution) throw new Error(`solution ${row.solutionId} no longer exists`);
    const orbit = JSON.parse(solution.orbitJson) as NormalizedOrbit;
    if (orbit.source.inputSha256 !== row.inputSha256) throw new Error('the stored solution does not match the hash the run was requested with');
    const engineOptions: AssessOptions = {
      untilTdbDays: options.untilTdbDays,
      methods: options.methods,
      clones: options.clones,
      seed: options.seed,
      bodies: options.bodies,
      maxAu: options.maxAu,
      analysisTdbDays: options.analysisTdbDays,
      workers: Math.max(1, Math.min(2, os.availableParallelism())),
    };

    // ETA where the engine gives none (linear, LOV): time so far in the stage over the fraction done.
    let stage: { name: string; startedMs: number } | null = null;
    const withEta = (p: ExecutorProgress): ExecutorProgress => {
      const now = Date.now();
      if (!stage || stage.name !== p.stage) stage = { name: p.stage, startedMs: now };
      if (p.etaS !== null || p.done <= 0 || p.total <= p.done) return p;
      const elapsedS = (now - stage.startedMs) / 1000;
      return { ...p, etaS: (elapsedS / p.done) * (p.total - p.done) };
    };
    const progress = throttledProgress<ExecutorProgress>((p) => {
      db.update(assessmentRuns)
        .set({ progressStage: p.stage, progressDone: p.done, progressTotal: p.total, rateClonesPerS: p.rateClonesPerS, etaS: p.etaS })
        .where(mine())
        .run();
    }, progressWriteMs);

    const json = await execute({ runId, orbit, options: engineOptions }, { onProgress: (raw) => progress.push(withEta(raw)), signal });
    progress.flush();
    const result = JSON.parse(json) as Record<string, unknown>;
    const engineProvenance = (result.provenance ?? {}) as Record<string, unknown>;
    const provenance: RunProvenance = { ...provenanceBase, ...engineProvenance, ...pickIds(provenanceBase) };
    const finishedAt = new Date();
    const summary = objectRiskSummary(result);
    db.transaction((tx) => {
      const changed = tx
        .update(assessmentRuns)
        .set({
          status: 'done',
          resultJson: json,
          provenanceJson: JSON.stringify(provenance),
          finishedAt,
          leaseOwner: null,
          leaseExpiresAt: null,
          progressDone: sql`max(${assessmentRuns.progressTotal}, 1)`,
          progressTotal: sql`max(${assessmentRuns.progressTotal}, 1)`,
          etaS: 0,
        })
        .where(mine())
        .run().changes;
      if (!changed) return; // cancelled or taken over meanwhile: this answer is dropped
      // The object's summary follows the latest solution version: a run of an older version does not replace it.
      const obj = tx.select({ latest: trackedObjects.latestSolutionVersion }).from(trackedObjects).where(eq(trackedObjects.id, row.objectId)).get();
      if (obj && (obj.latest === null || row.solutionVersion >= obj.latest)) {
        tx.update(trackedObjects)
          .set({ ...summary, lastRunAt: finishedAt, updatedAt: finishedAt })
          .where(eq(trackedObjects.id, row.objectId))
          .run();
      }
    });
    log(`run ${runId}: done`);
  }

  function pickIds(p: RunProvenance) {
    return { objectId: p.objectId, solutionId: p.solutionId, solutionVersion: p.solutionVersion, inputSha256: p.inputSha256 };
  }

  const runner = createLeaseRunner(
    db,
    { noun: 'run', table: 'assessment_runs', resetSql: 'rate_clones_per_s = NULL, eta_s = NULL', events: runs.events, execute: executeRun },
    { ...opts, log },
  );
  return {
    ...runner,
    /** Run ids this runner is working on now. */
    activeRunIds: runner.activeIds,
  };
}
export type Runner = ReturnType<typeof createRunner>;
