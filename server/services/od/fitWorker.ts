// Worker-thread entry point of one orbit fit (started by fitRunner.ts through runWorkerJob, one thread per fit,
// so the engine never blocks the server's event loop). Receives the fit input in workerData, runs the engine's
// determineOrbit() with its progress and abort hooks, and posts back (protocol of runs/executor.ts WorkerMessage):
//   {type:'progress', stage, done, total}
//   {type:'result', json}                       (the OrbitDeterminationResult as JSON text)
//   {type:'error', name, code, message, details}
// determineOrbit is synchronous, so an {type:'abort'} message is only seen between engine steps when the engine
// yields; the runner terminates the thread after a short grace in any case (executor.ts).
import { parentPort, workerData } from 'node:worker_threads';
import { determineOrbit, OrbitDeterminationError } from '../../engine/od';
import type { FitSettings, Observatory, OpticalObservation } from '../../../shared/schemas/od';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import type { WorkerMessage } from '../runs/executor';

export interface FitWorkerData {
  observations: OpticalObservation[];
  observatories: Observatory[];
  settings: FitSettings;
  initialOrbit: NormalizedOrbit | null;
}

export type FitProgress = { stage: string; done: number; total: number };

const port = parentPort;
if (!port) throw new Error('fitWorker.ts must run in a worker thread');

const controller = new AbortController();
port.on('message', (m: { type?: string }) => {
  if (m?.type === 'abort') controller.abort(new Error('aborted by the runner'));
});

const input = workerData as FitWorkerData;
const post = (m: WorkerMessage<FitProgress>) => port.postMessage(m);

try {
  const result = determineOrbit(
    { observations: input.observations, observatories: input.observatories, settings: input.settings, initialOrbit: input.initialOrbit },
    { signal: controller.signal, onProgress: (p) => post({ type: 'progress', stage: p.stage, done: p.done, total: p.total }) },
  );
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
    name: err instanceof OrbitDeterminationError ? 'OrbitDeterminationError' : (e?.name ?? 'Error'),
    code: typeof e?.code === 'string' ? e.code : null,
    message: e?.message ?? String(err),
    details,
  });
}
// The parent terminates this thread once it has the answer.
