// Worker-thread entry point of one assessment run (started by executor.ts, one thread per run, so the engine
// never blocks the server's event loop). Receives the normalised orbit and the engine options in workerData,
// runs the engine's assess() with its progress and abort hooks, and posts back:
//   {type:'progress', stage, done, total, rateClonesPerS, etaS}   (as the engine reports them)
//   {type:'result', json}                                         (the engine's assess JSON as text)
//   {type:'error', name, code, message, details}                  (the engine refused or failed)
// A message {type:'abort'} from the parent aborts the run through the engine's AbortSignal.
import { parentPort, workerData } from 'node:worker_threads';
import { assess, AssessError } from '../../engine/assess';
import type { AssessOptions, OrbitSolution } from '../../engine/assess';

export interface AssessWorkerData {
  orbit: OrbitSolution;
  options: AssessOptions;
}

export type AssessWorkerMessage =
  | { type: 'progress'; stage: string; done: number; total: number; rateClonesPerS: number | null; etaS: number | null }
  | { type: 'result'; json: string }
  | { type: 'error'; name: string; code: string | null; message: string; details: unknown };

const port = parentPort;
if (!port) throw new Error('assessWorker.ts must run in a worker thread');

const controller = new AbortController();
port.on('message', (m: { type?: string }) => {
  if (m?.type === 'abort') controller.abort(new Error('aborted by the runner'));
});

const { orbit, options } = workerData as AssessWorkerData;
const post = (m: AssessWorkerMessage) => port.postMessage(m);

try {
  const result = await assess(orbit, options, {
    signal: controller.signal,
    onProgress: (p) => post({ type: 'progress', stage: p.stage, done: p.done, total: p.total, rateClonesPerS: p.rateClonesPerS ?? null, etaS: p.etaS ?? null }),
  });
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
    name: err instanceof AssessError ? 'AssessError' : (e?.name ?? 'Error'),
    code: typeof e?.code === 'string' ? e.code : null,
    message: e?.message ?? String(err),
    details,
  });
}
// The parent terminates this thread once it has the answer (the port listener would keep it alive).
