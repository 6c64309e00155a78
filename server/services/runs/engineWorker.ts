// The thread side of runWorkerJob (executor.ts), shared by every engine worker (assessWorker.ts, od/fitWorker.ts):
// reads the job from workerData, turns a {type:'abort'} message from the parent into the engine's AbortSignal, and
// posts the WorkerMessage protocol back: progress, then the result as JSON text or the error (name, code, message,
// details made plain so they survive the structured clone).
import { parentPort, workerData } from 'node:worker_threads';
import type { WorkerMessage } from './executor';

export interface EngineJobHooks<P> {
  signal: AbortSignal;
  onProgress(p: P): void;
}

/**
 * Run `job` on this thread's workerData and post its answer to the parent. `engineError` names the engine's own
 * refusal class so the parent sees that name (other errors keep their own name).
 */
export async function serveEngineJob<D, P extends object>(
  workerFile: string,
  engineError: { type: abstract new (...args: never[]) => Error; name: string },
  job: (data: D, hooks: EngineJobHooks<P>) => unknown,
): Promise<void> {
  const port = parentPort;
  if (!port) throw new Error(`${workerFile} must run in a worker thread`);

  const controller = new AbortController();
  port.on('message', (m: { type?: string }) => {
    if (m?.type === 'abort') controller.abort(new Error('aborted by the runner'));
  });

  const post = (m: WorkerMessage<P>) => port.postMessage(m);

  try {
    const result = await job(workerData as D, { signal: controller.signal, onProgress: (p) => post({ type: 'progress', ...p }) });
    post({ type: 'result', json: JSON.stringify(result) });
  } catch (err) {
    const e = err as Error & { code?: unknown; details?: unknown };
    let details: unknown = null;
    try {
      details = e?.details === undefined ? null : JSON.parse(JSON.stringify(e.details));
    } catch {
      details = null;
    }
    post({
      type: 'error',
      name: err instanceof engineError.type ? engineError.name : (e?.name ?? 'Error'),
      code: typeof e?.code === 'string' ? e.code : null,
      message: e?.message ?? String(err),
      details,
    });
  }
  // The parent terminates this thread once it has the answer (the port listener would keep it alive).
}
