// The durable job runner shared by every kind of engine job (assessment runs, orbit fits): the job pattern of the
// handbook, with SQLite as the source of truth. One implementation of the queue mechanics; a job kind (JobKind)
// names its table and does the work of one job.
//
//  claim      one statement: UPDATE ... SET status='running', lease_owner=me, lease_expires_at=now+lease,
//             attempts=attempts+1 WHERE id=(oldest queued) AND status='queued' RETURNING; SQLite runs it atomically,
//             so two runners (or two processes on one file) never get the same job.
//  heartbeat  every heartbeatMs: lease_expires_at=now+lease WHERE id AND lease_owner=me AND status='running'. No row
//             changed means the job was cancelled or taken over: the local work is aborted at once.
//  finish     the kind's done write and the failed write carry the same WHERE (fencing), so a runner
//             that lost its lease can never write.
//  recovery   on start and on every poll: 'running' jobs whose lease expired go back to 'queued' (a process died
//             mid-job); on start also those owned by a process of this host that no longer exists. After
//             maxAttempts claims the job is marked failed instead of being retried for ever.
//  stop()     aborts local work and puts its jobs back to 'queued' (a clean restart resumes them at once);
//             stop({abandon:true}) leaves the rows as a crash would (tests: the lease must expire first).
//
// Every job table has these columns (see server/db/schema.ts): id, status, lease_owner, lease_expires_at (ms),
// attempts, started_at, finished_at, progress_stage, progress_done, progress_total, error.
import crypto from 'node:crypto';
import type { EventEmitter } from 'node:events';
import os from 'node:os';
import type { Db } from '../../db/client';

export interface JobEvents {
  created: [id: number];
  cancelled: [id: number];
}

export interface LeaseRunnerOptions {
  /** Lease owner id (default host/pid/random). */
  owner?: string;
  /** Lease length; a job whose owner stops heartbeating is requeued this long after the last beat (default 30 s). */
  leaseMs?: number;
  /** Heartbeat period (default leaseMs / 3). */
  heartbeatMs?: number;
  /** How often the queue is looked at when nothing wakes the runner (default 1 s). */
  pollMs?: number;
  /** Jobs at a time (default 1). */
  concurrency?: number;
  /** Claims of one job before it is marked failed (default 3). */
  maxAttempts?: number;
  log?: (message: string) => void;
}

export type AbortReason = { kind: 'cancelled' } | { kind: 'lease-lost' } | { kind: 'stop'; abandon: boolean };

export interface JobContext {
  id: number;
  /** Claims of this job so far, this one included. */
  attempt: number;
  /** This runner's lease owner id. */
  owner: string;
  /** Aborted on cancel, lease loss or stop (reason: AbortReason). */
  signal: AbortSignal;
  log: (message: string) => void;
}

export interface JobKind {
  /** Word used in log lines: "run 12: claimed by ...". */
  noun: string;
  /** The SQLite table of this kind's jobs (a fixed identifier of ours, never user input). */
  table: string;
  /** Extra assignments when a job is claimed, failed or put back in the queue (e.g. "eta_s = NULL"). */
  resetSql?: string;
  /** 'created' wakes the runner; 'cancelled' aborts the job's local work. */
  events: EventEmitter<JobEvents>;
  /**
   * Do one job. Every write to the job's row must carry the fencing condition
   * `id = ctx.id AND lease_owner = ctx.owner AND status = 'running'`. Throwing fails the job with the error's message, unless the signal was aborted.
   */
  execute(ctx: JobContext): Promise<void>;
}

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

/**
 * Progress writes at most every `minMs` (the last one always goes out on flush, and a "done = total" update at
 * once), so a fast engine does not turn into a stream of database writes.
 */
export function throttledProgress<P extends { done: number; total: number }>(write: (p: P) => void, minMs: number) {
  let lastWrite = 0;
  let pending: P | null = null;
  const out = (p: P) => {
    write(p);
    lastWrite = Date.now();
    pending = null;
  };
  return {
    push(p: P): void {
      if (Date.now() - lastWrite >= minMs || p.done >= p.total) out(p);
      else pending = p;
    },
    flush(): void {
      if (pending) out(pending);
    },
  };
}

interface Active {
  id: number;
  controller: AbortController;
  done: Promise<void>;
}

export function createLeaseRunner(db: Db, kind: JobKind, opts: LeaseRunnerOptions = {}) {
  const owner = opts.owner ?? defaultOwner();
  const leaseMs = opts.leaseMs ?? 30_000;
  const heartbeatMs = opts.heartbeatMs ?? Math.max(50, Math.floor(leaseMs / 3));
  const pollMs = opts.pollMs ?? 1000;
  const concurrency = Math.max(1, opts.concurrency ?? 1);
  const maxAttempts = opts.maxAttempts ?? 3;
  const log = opts.log ?? ((m: string) => console.log(`[jobs] ${m}`));
  const T = kind.table;
  const reset = kind.resetSql ? `, ${kind.resetSql}` : '';

  const active = new Map<number, Active>();
  let started = false;
  let stopped = false;
  let pollTimer: NodeJS.Timeout | undefined;
  let heartbeatTimer: NodeJS.Timeout | undefined;
  let ticking = false;

  const sql = db.$client;
  const claimStatement = sql.prepare(`
    UPDATE ${T}
       SET status = 'running', lease_owner = @owner, lease_expires_at = @expires, attempts = attempts + 1,
           started_at = coalesce(started_at, @now), progress_stage = NULL, progress_done = 0, progress_total = 0,
           error = NULL${reset}
     WHERE id = (SELECT id FROM ${T} WHERE status = 'queued' ORDER BY id LIMIT 1)
       AND status = 'queued'
    RETURNING id, attempts`);
  const runningStatement = sql.prepare(`SELECT id, attempts, lease_owner AS leaseOwner, lease_expires_at AS leaseExpiresAt FROM ${T} WHERE status = 'running'`);
  // The recovery UPDATE repeats the condition it was chosen by: another process may have renewed its lease since.
  const requeueStaleStatement = sql.prepare(`
    UPDATE ${T} SET status = 'queued', lease_owner = NULL, lease_expires_at = NULL${reset}
     WHERE id = @id AND status = 'running' AND lease_owner IS @leaseOwner
       AND (@checkExpiry = 0 OR lease_expires_at IS NULL OR lease_expires_at < @now)`);
  const failStaleStatement = sql.prepare(`
    UPDATE ${T} SET status = 'failed', error = @error, finished_at = @now, lease_owner = NULL, lease_expires_at = NULL${reset}
     WHERE id = @id AND status = 'running' AND lease_owner IS @leaseOwner
       AND (@checkExpiry = 0 OR lease_expires_at IS NULL OR lease_expires_at < @now)`);
  const heartbeatStatement = sql.prepare(`UPDATE ${T} SET lease_expires_at = @expires WHERE id = @id AND lease_owner = @owner AND status = 'running'`);
  const statusStatement = sql.prepare(`SELECT status FROM ${T} WHERE id = ?`);
  const failStatement = sql.prepare(`
    UPDATE ${T} SET status = 'failed', error = @error, finished_at = @now, lease_owner = NULL, lease_expires_at = NULL${reset}
     WHERE id = @id AND lease_owner = @owner AND status = 'running'`);
  const requeueStatement = sql.prepare(`
    UPDATE ${T} SET status = 'queued', lease_owner = NULL, lease_expires_at = NULL${reset}
     WHERE id = @id AND lease_owner = @owner AND status = 'running'`);

  /** Put jobs whose owner is gone back in the queue (or fail them after maxAttempts). Returns how many. */
  function recover(includeDeadOwners: boolean): number {
    const now = Date.now();
    const rows = runningStatement.all() as { id: number; attempts: number; leaseOwner: string | null; leaseExpiresAt: number | null }[];
    let n = 0;
    for (const r of rows) {
      if (r.leaseOwner === owner && active.has(r.id)) continue;
      const expired = r.leaseExpiresAt === null || r.leaseExpiresAt < now;
      const deadOwner = includeDeadOwners && r.leaseOwner !== null && ownerProcessIsGone(r.leaseOwner);
      if (!expired && !deadOwner) continue;
      const failed = r.attempts >= maxAttempts;
      const params = { id: r.id, leaseOwner: r.leaseOwner, checkExpiry: expired ? 1 : 0, now };
      const changed = failed
        ? failStaleStatement.run({ ...params, error: `the ${kind.noun} was interrupted ${r.attempts} times (its process stopped); not retried again` }).changes
        : requeueStaleStatement.run(params).changes;
      if (changed) {
        n++;
        log(failed ? `${kind.noun} ${r.id}: interrupted ${r.attempts} times, marked failed` : `${kind.noun} ${r.id}: owner ${r.leaseOwner ?? '?'} is gone, back in the queue`);
      }
    }
    return n;
  }

  function claim(): { id: number; attempts: number } | null {
    const now = Date.now();
    return (claimStatement.get({ owner, expires: now + leaseMs, now }) as { id: number; attempts: number } | undefined) ?? null;
  }

  function heartbeat(): void {
    const expires = Date.now() + leaseMs;
    for (const a of active.values()) {
      if (a.controller.signal.aborted) continue;
      const changed = heartbeatStatement.run({ expires, id: a.id, owner }).changes;
      if (!changed) {
        const status = (statusStatement.get(a.id) as { status: string } | undefined)?.status;
        a.controller.abort(status === 'cancelled' ? ({ kind: 'cancelled' } satisfies AbortReason) : ({ kind: 'lease-lost' } satisfies AbortReason));
      }
    }
  }

  function fail(id: number, reason: string): void {
    failStatement.run({ id, owner, error: reason.slice(0, 4000), now: Date.now() });
    log(`${kind.noun} ${id}: failed: ${reason}`);
  }

  async function executeOne(id: number, attempt: number, controller: AbortController): Promise<void> {
    try {
      await kind.execute({ id, attempt, owner, signal: controller.signal, log });
    } catch (err) {
      if (controller.signal.aborted) {
        const reason = controller.signal.reason as AbortReason | undefined;
        if (reason?.kind === 'stop' && !reason.abandon) {
          requeueStatement.run({ id, owner });
          log(`${kind.noun} ${id}: stopped with the server, back in the queue`);
        } else log(`${kind.noun} ${id}: aborted (${reason?.kind ?? 'unknown'})`);
        return;
      }
      fail(id, (err as Error)?.message || String(err));
    }
  }

  function tick(): void {
    if (!started || stopped || ticking) return;
    ticking = true;
    try {
      recover(false);
      while (active.size < concurrency && !stopped) {
        const claimed = claim();
        if (claimed === null) break;
        const { id, attempts } = claimed;
        const controller = new AbortController();
        const entry: Active = { id, controller, done: Promise.resolve() };
        active.set(id, entry);
        log(`${kind.noun} ${id}: claimed by ${owner}`);
        entry.done = executeOne(id, attempts, controller)
          .catch((err) => {
            log(`${kind.noun} ${id}: runner error: ${(err as Error).message}`);
            try {
              fail(id, `runner error: ${(err as Error).message}`);
            } catch {
              /* the database may be closed */
            }
          })
          .finally(() => {
            active.delete(id);
            if (!stopped) setImmediate(tick);
          });
      }
    } finally {
      ticking = false;
    }
  }

  const onCreated = () => setImmediate(tick);
  const onCancelled = (id: number) => active.get(id)?.controller.abort({ kind: 'cancelled' } satisfies AbortReason);

  return {
    owner,
    /** Job ids this runner is working on now. */
    activeIds: () => [...active.keys()],

    start(): void {
      if (started) return;
      started = true;
      const n = recover(true);
      if (n) log(`${n} interrupted ${kind.noun}(s) put back in the queue`);
      kind.events.on('created', onCreated);
      kind.events.on('cancelled', onCancelled);
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
      kind.events.off('created', onCreated);
      kind.events.off('cancelled', onCancelled);
      const all = [...active.values()];
      for (const a of all) a.controller.abort({ kind: 'stop', abandon } satisfies AbortReason);
      await Promise.all(all.map((a) => a.done));
    },
  };
}
export type LeaseRunner = ReturnType<typeof createLeaseRunner>;
