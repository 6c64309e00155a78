// The durable job runner of assessment runs (the job pattern of the handbook: SQLite is the source of truth).
//
//  claim      one statement: UPDATE ... SET status='running', lease_owner=me, lease_expires_at=now+lease,
//             attempts=attempts+1 WHERE id=(oldest queued) AND status='queued' RETURNING; SQLite runs it atomically,
//             so two runners (or two processes on one file) never get the same run.
//  heartbeat  every heartbeatMs: lease_expires_at=now+lease WHERE id AND lease_owner=me AND status='running'. No row
//             changed means the run was cancelled or taken over: the local work is aborted at once.
//  finish     done/failed writes carry the same WHERE (fencing), so a runner that lost its lease can never write.
//  recovery   on start and on every poll: 'running' runs whose lease expired go back to 'queued' (a process died
//             mid-run); on start also those owned by a process of this host that no longer exists. After
//             maxAttempts claims the run is marked failed instead of being retried for ever.
//  stop()     aborts local work and puts its runs back to 'queued' (a clean restart resumes them at once);
//             stop({abandon:true}) leaves the rows as a crash would (tests: the lease must expire first).
// The engine runs in a worker thread per run (executor.ts); `concurrency` runs at a time (default 1: 2 cores).
import crypto from 'node:crypto';
import os from 'node:os';
import { and, eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { assessmentRuns, orbitSolutions, trackedObjects, type AssessmentRunRow } from '../../db/schema';
import type { AssessOptions } from '../../engine/assess';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import type { RunOptions, RunProvenance } from '../../../shared/schemas/runs';
import { EngineAbortedError, workerExecutor, type Executor, type ExecutorProgress } from './executor';
import type { RunService } from './service';
import { objectRiskSummary } from './summary';

export interface RunnerOptions {
  /** Lease owner id (default host/pid/random). */
  owner?: string;
  /** Lease length; a run whose owner stops heartbeating is requeued this long after the last beat (default 30 s). */
  leaseMs?: number;
  /** Heartbeat period (default leaseMs / 3). */
  heartbeatMs?: number;
  /** How often the queue is looked at when nothing wakes the runner (default 1 s). */
  pollMs?: number;
  /** Runs at a time (default 1). */
  concurrency?: number;
  /** Claims of one run before it is marked failed (default 3). */
  maxAttempts?: number;
  /** Least time between two progress writes of one run (default 500 ms). */
  progressWriteMs?: number;
  executor?: Executor;
  log?: (message: string) => void;
}

interface Active {
  runId: number;
  controller: AbortController;
  done: Promise<void>;
}

type AbortReason = { kind: 'cancelled' } | { kind: 'lease-lost' } | { kind: 'stop'; abandon: boolean };

export function defaultOwner(): string {
  return `${os.hostname()}/${process.pid}/${crypto.randomBytes(4).toString('hex')}`;
}

/** Whether an owner id names a process of this host that is gone. */
function ownerProcessIsGone(owner: string): boolean {
  const [host, pidText] = owner.split('/');
  const pid = Number(pidText);
  if (host !== os.hostname() || !Number.isInteger(pid) || pid <= 0 || pid === process.pid) return false;
  try {
    process.kill(pid, 0);
    return false;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

export function createRunner(db: Db, runs: RunService, opts: RunnerOptions = {}) {
  const owner = opts.owner ?? defaultOwner();
  const leaseMs = opts.leaseMs ?? 30_000;
  const heartbeatMs = opts.heartbeatMs ?? Math.max(50, Math.floor(leaseMs / 3));
  const pollMs = opts.pollMs ?? 1000;
  const concurrency = Math.max(1, opts.concurrency ?? 1);
  const maxAttempts = opts.maxAttempts ?? 3;
  const progressWriteMs = opts.progressWriteMs ?? 500;
  const execute = opts.executor ?? workerExecutor;
  const log = opts.log ?? ((m: string) => console.log(`[runs] ${m}`));

  const active = new Map<number, Active>();
  let started = false;
  let stopped = false;
  let pollTimer: NodeJS.Timeout | undefined;
  let heartbeatTimer: NodeJS.Timeout | undefined;
  let ticking = false;

  const claimStatement = db.$client.prepare(`
    UPDATE assessment_runs
       SET status = 'running', lease_owner = @owner, lease_expires_at = @expires, attempts = attempts + 1,
           started_at = coalesce(started_at, @now), progress_stage = NULL, progress_done = 0, progress_total = 0,
           rate_clones_per_s = NULL, eta_s = NULL, error = NULL
     WHERE id = (SELECT id FROM assessment_runs WHERE status = 'queued' ORDER BY id LIMIT 1)
       AND status = 'queued'
    RETURNING id`);

  const mine = (runId: number) => and(eq(assessmentRuns.id, runId), eq(assessmentRuns.leaseOwner, owner), eq(assessmentRuns.status, 'running'));

  /** Put runs whose owner is gone back in the queue (or fail them after maxAttempts). Returns how many. */
  function recover(includeDeadOwners: boolean): number {
    const now = new Date();
    const stale = db
      .select({ id: assessmentRuns.id, attempts: assessmentRuns.attempts, leaseOwner: assessmentRuns.leaseOwner, leaseExpiresAt: assessmentRuns.leaseExpiresAt })
      .from(assessmentRuns)
      .where(eq(assessmentRuns.status, 'running'))
      .all()
      .filter((r) => r.leaseOwner !== owner || !active.has(r.id))
      .filter((r) => (r.leaseExpiresAt === null || r.leaseExpiresAt.getTime() < now.getTime()) || (includeDeadOwners && r.leaseOwner !== null && ownerProcessIsGone(r.leaseOwner)));
    let n = 0;
    for (const r of stale) {
      // The condition is repeated in the UPDATE: another process may have renewed its lease since the SELECT.
      const expired = r.leaseExpiresAt === null || r.leaseExpiresAt.getTime() < now.getTime();
      const guard = and(
        eq(assessmentRuns.id, r.id),
        eq(assessmentRuns.status, 'running'),
        r.leaseOwner === null ? sql`${assessmentRuns.leaseOwner} is null` : eq(assessmentRuns.leaseOwner, r.leaseOwner),
        expired ? sql`(${assessmentRuns.leaseExpiresAt} is null or ${assessmentRuns.leaseExpiresAt} < ${now.getTime()})` : undefined,
      );
      const failed = r.attempts >= maxAttempts;
      const changed = db
        .update(assessmentRuns)
        .set(
          failed
            ? { status: 'failed', error: `the run was interrupted ${r.attempts} times (its process stopped); not retried again`, finishedAt: now, leaseOwner: null, leaseExpiresAt: null }
            : { status: 'queued', leaseOwner: null, leaseExpiresAt: null },
        )
        .where(guard)
        .run().changes;
      if (changed) {
        n++;
        log(failed ? `run ${r.id}: interrupted ${r.attempts} times, marked failed` : `run ${r.id}: owner ${r.leaseOwner ?? '?'} is gone, back in the queue`);
      }
    }
    return n;
  }

  function claim(): number | null {
    const now = Date.now();
    const row = claimStatement.get({ owner, expires: now + leaseMs, now }) as { id: number } | undefined;
    return row ? row.id : null;
  }

  function heartbeat(): void {
    const expires = new Date(Date.now() + leaseMs);
    for (const a of active.values()) {
      if (a.controller.signal.aborted) continue;
      const changed = db.update(assessmentRuns).set({ leaseExpiresAt: expires }).where(mine(a.runId)).run().changes;
      if (!changed) {
        const status = db.select({ status: assessmentRuns.status }).from(assessmentRuns).where(eq(assessmentRuns.id, a.runId)).get()?.status;
        a.controller.abort(status === 'cancelled' ? ({ kind: 'cancelled' } satisfies AbortReason) : ({ kind: 'lease-lost' } satisfies AbortReason));
      }
    }
  }

  async function execute1(runId: number, controller: AbortController): Promise<void> {
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
      attempt: row.attempts,
      runner: owner,
    };
    db.update(assessmentRuns).set({ provenanceJson: JSON.stringify(provenanceBase), progressStage: 'starting', progressTotal: 1 }).where(mine(runId)).run();

    if (!solution) return fail(runId, `solution ${row.solutionId} no longer exists`);
    const orbit = JSON.parse(solution.orbitJson) as NormalizedOrbit;
    if (orbit.source.inputSha256 !== row.inputSha256) return fail(runId, 'the stored solution does not match the hash the run was requested with');
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

    let lastWrite = 0;
    let pending: ExecutorProgress | null = null;
    // ETA where the engine gives none (linear, LOV): time so far in the stage over the fraction done.
    let stage: { name: string; startedMs: number } | null = null;
    const withEta = (p: ExecutorProgress): ExecutorProgress => {
      const now = Date.now();
      if (!stage || stage.name !== p.stage) stage = { name: p.stage, startedMs: now };
      if (p.etaS !== null || p.done <= 0 || p.total <= p.done) return p;
      const elapsedS = (now - stage.startedMs) / 1000;
      return { ...p, etaS: (elapsedS / p.done) * (p.total - p.done) };
    };
    const writeProgress = (p: ExecutorProgress) => {
      db.update(assessmentRuns)
        .set({ progressStage: p.stage, progressDone: p.done, progressTotal: p.total, rateClonesPerS: p.rateClonesPerS, etaS: p.etaS })
        .where(mine(runId))
        .run();
      lastWrite = Date.now();
      pending = null;
    };
    const onProgress = (raw: ExecutorProgress) => {
      const p = withEta(raw);
      if (Date.now() - lastWrite >= progressWriteMs || p.done >= p.total) writeProgress(p);
      else pending = p;
    };

    try {
      const json = await execute({ runId, orbit, options: engineOptions }, { onProgress, signal: controller.signal });
      if (pending) writeProgress(pending);
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
          .where(mine(runId))
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
    } catch (err) {
      if (err instanceof EngineAbortedError || controller.signal.aborted) {
        const reason = controller.signal.reason as AbortReason | undefined;
        if (reason?.kind === 'stop' && !reason.abandon) {
          db.update(assessmentRuns).set({ status: 'queued', leaseOwner: null, leaseExpiresAt: null, etaS: null }).where(mine(runId)).run();
          log(`run ${runId}: stopped with the server, back in the queue`);
        } else log(`run ${runId}: aborted (${reason?.kind ?? 'unknown'})`);
        return;
      }
      fail(runId, (err as Error).message || String(err));
    }
  }

  function pickIds(p: RunProvenance) {
    return { objectId: p.objectId, solutionId: p.solutionId, solutionVersion: p.solutionVersion, inputSha256: p.inputSha256 };
  }

  function fail(runId: number, reason: string): void {
    db.update(assessmentRuns)
      .set({ status: 'failed', error: reason.slice(0, 4000), finishedAt: new Date(), leaseOwner: null, leaseExpiresAt: null, etaS: null })
      .where(mine(runId))
      .run();
    log(`run ${runId}: failed: ${reason}`);
  }

  function tick(): void {
    if (!started || stopped || ticking) return;
    ticking = true;
    try {
      recover(false);
      while (active.size < concurrency && !stopped) {
        const runId = claim();
        if (runId === null) break;
        const controller = new AbortController();
        const entry: Active = { runId, controller, done: Promise.resolve() };
        active.set(runId, entry);
        log(`run ${runId}: claimed by ${owner}`);
        entry.done = execute1(runId, controller)
          .catch((err) => {
            log(`run ${runId}: runner error: ${(err as Error).message}`);
            try {
              fail(runId, `runner error: ${(err as Error).message}`);
            } catch {
              /* the database may be closed */
            }
          })
          .finally(() => {
            active.delete(runId);
            if (!stopped) setImmediate(tick);
          });
      }
    } finally {
      ticking = false;
    }
  }

  const onCreated = () => setImmediate(tick);
  const onCancelled = (runId: number) => active.get(runId)?.controller.abort({ kind: 'cancelled' } satisfies AbortReason);

  return {
    owner,
    /** Run ids this runner is working on now. */
    activeRunIds: () => [...active.keys()],

    start(): void {
      if (started) return;
      started = true;
      const n = recover(true);
      if (n) log(`${n} interrupted run(s) put back in the queue`);
      runs.events.on('created', onCreated);
      runs.events.on('cancelled', onCancelled);
      pollTimer = setInterval(tick, pollMs);
      heartbeatTimer = setInterval(heartbeat, heartbeatMs);
      pollTimer.unref();
      heartbeatTimer.unref();
      tick();
    },

    async stop({ abandon = false }: { abandon?: boolean } = {}): Promise<void> {
      if (stopped) return;
      stopped = true;
      clearInterval(pollTimer);
      clearInterval(heartbeatTimer);
      runs.events.off('created', onCreated);
      runs.events.off('cancelled', onCancelled);
      const all = [...active.values()];
      for (const a of all) a.controller.abort({ kind: 'stop', abandon } satisfies AbortReason);
      await Promise.all(all.map((a) => a.done));
    },
  };
}
export type Runner = ReturnType<typeof createRunner>;
