// Engine work in worker threads, outside the server's event loop: runWorkerJob (any engine worker: assessments here,
// orbit fits in ../od/fitWorker.ts) and workerExecutor, one assessment in assessWorker.ts. The runner (runner.ts) only
// sees the Executor type, so tests can wrap the real executor to observe it.
import { Worker } from 'node:worker_threads';
import type { AssessOptions, OrbitSolution } from '../../engine/assess';
import type { AssessWorkerData } from './assessWorker';

export interface ExecutorProgress {
  stage: string;
  done: number;
  total: number;
  rateClonesPerS: number | null;
  etaS: number | null;
}

export interface ExecutorJob {
  runId: number;
  orbit: OrbitSolution;
  options: AssessOptions;
}

export interface ExecutorHooks {
  onProgress(p: ExecutorProgress): void;
  /** Aborting ends the work: the promise rejects with EngineAbortedError and the thread is stopped. */
  signal: AbortSignal;
}

/** Resolves with the engine's assess JSON (text). */
export type Executor = (job: ExecutorJob, hooks: ExecutorHooks) => Promise<string>;

/** The engine refused or failed: `message` is the reason stored on the run. */
export class EngineRunError extends Error {
  constructor(
    message: string,
    readonly code: string | null,
    readonly details: unknown,
  ) {
    super(message);
    this.name = 'EngineRunError';
  }
}

export class EngineAbortedError extends Error {
  constructor(readonly reason: unknown) {
    super('the run was aborted');
    this.name = 'EngineAbortedError';
  }
}

/** A JavaScript entry that registers tsx in the thread and imports assessWorker.ts. */
const WORKER_URL = new URL('./assessWorker.boot.mjs', import.meta.url);
/** Time the engine gets to stop on its AbortSignal before the thread is terminated. */
const ABORT_GRACE_MS = 250;

/** What every engine worker thread posts (assessWorker.ts, od/fitWorker.ts): progress, then a result or an error. */
export type WorkerMessage<P> =
  | ({ type: 'progress' } & P)
  | { type: 'result'; json: string }
  | { type: 'error'; name: string; code: string | null; message: string; details: unknown };

/**
 * Run one engine job in a new worker thread started from `bootUrl` with `workerData`; resolves with the JSON text
 * the worker posts as its result. Aborting the signal posts {type:'abort'} to the worker (the engine's own
 * AbortSignal), rejects with EngineAbortedError at once and terminates the thread after a short grace.
 */
export function runWorkerJob<P>(
  bootUrl: URL,
  workerData: unknown,
  name: string,
  { onProgress, signal }: { onProgress(p: Omit<Extract<WorkerMessage<P>, { type: 'progress' }>, 'type'>): void; signal: AbortSignal },
): Promise<string> {
  return new Promise<string>((resolve, reject) => {
    if (signal.aborted) return reject(new EngineAbortedError(signal.reason));
    // No inherited loader flags: the boot file registers tsx itself (same under `tsx server/index.ts` and vitest).
    const worker = new Worker(bootUrl, { workerData, execArgv: [], name });
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      signal.removeEventListener('abort', onAbort);
      fn();
      void worker.terminate();
    };
    const onAbort = () => {
      if (settled) return;
      settled = true;
      worker.postMessage({ type: 'abort' });
      setTimeout(() => void worker.terminate(), ABORT_GRACE_MS).unref();
      reject(new EngineAbortedError(signal.reason));
    };
    signal.addEventListener('abort', onAbort, { once: true });
    worker.on('message', (m: WorkerMessage<P>) => {
      if (m.type === 'progress') {
        const { type: _type, ...p } = m;
        if (!settled) onProgress(p);
      } else if (m.type === 'result') finish(() => resolve(m.json));
      else if (m.type === 'error') finish(() => reject(new EngineRunError(m.code ? `${m.code}: ${m.message}` : m.message, m.code, m.details)));
    });
    worker.on('error', (err) => finish(() => reject(new EngineRunError(`the engine worker crashed: ${err.message}`, 'WORKER_CRASHED', null))));
    worker.on('exit', (code) => finish(() => reject(new EngineRunError(`the engine worker stopped unexpectedly (exit code ${code})`, 'WORKER_EXITED', null))));
  });
}

export const workerExecutor: Executor = (job, { onProgress, signal }) => {
  const data: AssessWorkerData = { orbit: job.orbit, options: job.options };
  return runWorkerJob<ExecutorProgress>(WORKER_URL, data, `assess-run-${job.runId}`, {
    signal,
    onProgress: (m) => onProgress({ stage: m.stage, done: m.done, total: m.total, rateClonesPerS: m.rateClonesPerS, etaS: m.etaS }),
  });
};
