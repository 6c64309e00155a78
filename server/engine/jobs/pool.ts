/**
 * Worker-thread pool for Monte Carlo runs (piscina 5).
 *
 * - One thread per core by default (os.availableParallelism()).
 * - Workers run the TypeScript entry mc-worker.ts through tsx (`execArgv: ['--import', 'tsx']`), also under vitest.
 * - Tasks are contiguous blocks of clone indices (jobs/mc-task.ts); cancellation through an AbortSignal per task
 *   (piscina drops queued tasks and terminates a worker running an aborted one).
 * - destroy() shuts the threads down; callers must call it (runMonteCarlo does, in a finally block).
 */
import os from 'node:os';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { McTask, McTaskResult } from './mc-task';

export type McWorkerResult = McTaskResult & { ephemerisBuildMs: number };

export const MC_WORKER_FILE = fileURLToPath(new URL('./mc-worker.ts', import.meta.url));

export function defaultWorkerCount(): number {
  return Math.max(1, os.availableParallelism());
}

export class McPool {
  readonly threads: number;
  private readonly pool: Piscina<McTask, McWorkerResult>;
  private destroyed = false;

  constructor(threads: number = defaultWorkerCount()) {
    if (!Number.isInteger(threads) || threads < 1) throw new RangeError(`worker count must be a positive integer, got ${threads}`);
    this.threads = threads;
    this.pool = new Piscina<McTask, McWorkerResult>({
      filename: MC_WORKER_FILE,
      execArgv: ['--import', 'tsx'],
      minThreads: threads,
      maxThreads: threads,
      idleTimeout: 60_000,
      // One task at a time per worker: a task is a whole lockstep batch.
      concurrentTasksPerWorker: 1,
    });
  }

  run(task: McTask, signal?: AbortSignal): Promise<McWorkerResult> {
    return this.pool.run(task, { signal: signal ?? null });
  }

  async destroy(): Promise<void> {
    if (this.destroyed) return;
    this.destroyed = true;
    await this.pool.destroy();
  }
}
