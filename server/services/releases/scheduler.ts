// The durable release scheduler. The database is the source of truth for what is scheduled (releases.publish_at of
// rows in state 'scheduled'): on start the scheduler publishes everything that fell due while the server was down
// (recording how late, publishedOnStart), then arms ONE timer for the earliest publication time, re-armed whenever a
// time is set or removed and at least every `maxSleepMs` (so a release scheduled by another process on the same
// database is also found). Publishing is idempotent (the service's conditional UPDATE scheduled -> published), so a
// timer firing twice, two processes, or a restart in between still publish each release once.
// The clock and timers are injectable for tests.
import type { PublishResult, ReleaseService } from './service';

export interface ReleaseSchedulerOptions {
  now?: () => number;
  /** Longest sleep between looks at the database (ms). */
  maxSleepMs?: number;
  log?: (message: string) => void;
}

export interface ReleaseScheduler {
  /** Publish what is overdue (publishedOnStart), then keep publishing at each release's time. */
  start(): PublishResult[];
  /** Look again now (e.g. after a publication time changed). */
  rearm(): void;
  stop(): void;
  /** Publish what is due now (also used by tests with an injected clock). */
  tick(): PublishResult[];
  readonly running: boolean;
}

export function createReleaseScheduler(releases: ReleaseService, opts: ReleaseSchedulerOptions = {}): ReleaseScheduler {
  const now = opts.now ?? (() => Date.now());
  const maxSleepMs = opts.maxSleepMs ?? 30_000;
  const log = opts.log ?? ((m: string) => console.log(m));
  let timer: NodeJS.Timeout | null = null;
  let running = false;
  let unsubscribe: (() => void) | null = null;

  const report = (published: PublishResult[]) => {
    for (const p of published) log(`[releases] published #${p.id} (${p.slug})${p.onStart ? ` on start, ${Math.round(p.lateByMs / 1000)} s late` : ''}; ${p.outboxIds.length} press e-mail(s)`);
  };

  function tick(): PublishResult[] {
    let published: PublishResult[] = [];
    try {
      published = releases.publishDue(now(), false);
      report(published);
    } catch (err) {
      log(`[releases] scheduler tick failed: ${err instanceof Error ? err.message : String(err)}`);
    }
    return published;
  }

  function arm(): void {
    if (timer) clearTimeout(timer);
    timer = null;
    if (!running) return;
    let next: number | null = null;
    try {
      next = releases.nextPublishAtMs();
    } catch {
      next = null;
    }
    const delay = next === null ? maxSleepMs : Math.min(maxSleepMs, Math.max(0, next - now()));
    timer = setTimeout(() => {
      timer = null;
      if (!running) return;
      tick();
      arm();
    }, delay);
    timer.unref();
  }

  return {
    start() {
      if (running) return [];
      running = true;
      unsubscribe = releases.onScheduleChange(() => arm());
      let published: PublishResult[] = [];
      try {
        published = releases.publishDue(now(), true);
        report(published);
      } catch (err) {
        log(`[releases] publishing overdue releases failed: ${err instanceof Error ? err.message : String(err)}`);
      }
      arm();
      return published;
    },
    rearm: arm,
    stop() {
      running = false;
      unsubscribe?.();
      unsubscribe = null;
      if (timer) clearTimeout(timer);
      timer = null;
    },
    tick,
    get running() {
      return running;
    },
  };
}
