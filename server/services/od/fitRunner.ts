// The orbit-fit kind of the durable job runner (server/services/jobs/leaseRunner.ts holds the queue mechanics
// shared with assessment runs: atomic claim, lease heartbeat, fencing, recovery after a crash, clean stop).
// One fit: read the input fixed at queue time (observation ids, checked against their SHA-256, and the copy of the
// observatories), run determineOrbit in a worker thread, write its progress, validate the result against
// orbitDeterminationResultSchema and store it; every write fenced on the fit's lease.
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { observations, orbitFits, orbitSolutions } from '../../db/schema';
import { orbitDeterminationResultSchema, type FitSettings, type Observatory } from '../../../shared/schemas/od';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import { createLeaseRunner, throttledProgress, type JobContext, type LeaseRunnerOptions } from '../jobs/leaseRunner';
import { runWorkerJob } from '../runs/executor';
import { opticalOfRow } from './astrometry';
import { fitInputSha256, type FitService } from './fits';
import type { FitProgress, FitWorkerData } from './fitWorker';

/** Runs one fit and resolves with the engine's result JSON (tests may wrap the real one to observe it). */
export type FitExecutor = (job: { fitId: number; data: FitWorkerData }, hooks: { onProgress(p: FitProgress): void; signal: AbortSignal }) => Promise<string>;

const FIT_WORKER_URL = new URL('./fitWorker.boot.mjs', import.meta.url);

export const workerFitExecutor: FitExecutor = ({ fitId, data }, hooks) => runWorkerJob<FitProgress>(FIT_WORKER_URL, data, `orbit-fit-${fitId}`, hooks);

export interface FitRunnerOptions extends LeaseRunnerOptions {
  /** Least time between two progress writes of one fit (default 500 ms). */
  progressWriteMs?: number;
  executor?: FitExecutor;
}

export function createFitRunner(db: Db, fits: FitService, opts: FitRunnerOptions = {}) {
  const progressWriteMs = opts.progressWriteMs ?? 500;
  const execute = opts.executor ?? workerFitExecutor;
  const log = opts.log ?? ((m: string) => console.log(`[fits] ${m}`));

  async function executeFit({ id, owner, signal }: JobContext): Promise<void> {
    const mine = () => and(eq(orbitFits.id, id), eq(orbitFits.leaseOwner, owner), eq(orbitFits.status, 'running'));
    const row = db.select().from(orbitFits).where(eq(orbitFits.id, id)).get()!;
    const settings = JSON.parse(row.settingsJson) as FitSettings;
    const ids = JSON.parse(row.observationIdsJson) as number[];
    const observatories = JSON.parse(row.observatoriesJson) as Observatory[];
    db.update(orbitFits).set({ progressStage: 'starting', progressTotal: 1 }).where(mine()).run();

    const byId = new Map(db.select().from(observations).where(inArray(observations.id, ids)).all().map((r) => [r.id, r]));
    const missing = ids.filter((i) => !byId.has(i));
    if (missing.length) throw new Error(`observations ${missing.slice(0, 5).join(', ')} of the fit's input no longer exist`);
    const optical = ids.map((i) => opticalOfRow(byId.get(i)!));
    if (fitInputSha256(optical, observatories) !== row.observationsSha256) throw new Error('the stored observations do not match the hash the fit was queued with');

    let initialOrbit: NormalizedOrbit | null = null;
    if (settings.initialSolutionId !== null) {
      const s = db.select({ orbitJson: orbitSolutions.orbitJson }).from(orbitSolutions).where(eq(orbitSolutions.id, settings.initialSolutionId)).get();
      if (!s) throw new Error(`the initial solution ${settings.initialSolutionId} no longer exists`);
      initialOrbit = JSON.parse(s.orbitJson) as NormalizedOrbit;
    }

    const progress = throttledProgress<FitProgress>((p) => {
      db.update(orbitFits).set({ progressStage: p.stage, progressDone: p.done, progressTotal: p.total }).where(mine()).run();
    }, progressWriteMs);
    const json = await execute({ fitId: id, data: { observations: optical, observatories, settings, initialOrbit } }, { onProgress: (p) => progress.push(p), signal });
    progress.flush();
    const checked = orbitDeterminationResultSchema.safeParse(JSON.parse(json));
    if (!checked.success) {
      const i = checked.error.issues[0];
      throw new Error(`the engine's result does not match the result schema (${i.path.join('.')}: ${i.message})`);
    }
    const changed = db
      .update(orbitFits)
      .set({
        status: 'done',
        resultJson: json,
        finishedAt: new Date(),
        leaseOwner: null,
        leaseExpiresAt: null,
        progressDone: sql`max(${orbitFits.progressTotal}, 1)`,
        progressTotal: sql`max(${orbitFits.progressTotal}, 1)`,
      })
      .where(mine())
      .run().changes;
    log(changed ? `fit ${id}: done` : `fit ${id}: finished after it was cancelled or taken over; answer dropped`);
  }

  return createLeaseRunner(db, { noun: 'fit', table: 'orbit_fits', events: fits.events, execute: executeFit }, { ...opts, log });
}
export type FitRunner = ReturnType<typeof createFitRunner>;
