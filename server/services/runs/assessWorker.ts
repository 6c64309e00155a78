// Worker-thread entry point of one assessment run (started by executor.ts, one thread per run, so the engine
// never blocks the server's event loop). Receives the normalised orbit and the engine options in workerData,
// runs the engine's assess() with its progress and abort hooks, and posts back (engineWorker.ts):
//   {type:'progress', stage, done, total, rateClonesPerS, etaS}   (as the engine reports them)
//   {type:'result', json}                                         (the engine's assess JSON as text)
//   {type:'error', name, code, message, details}                  (the engine refused or failed)
// A message {type:'abort'} from the parent aborts the run through the engine's AbortSignal.
import { assess, AssessError } from '../../engine/assess';
import type { AssessOptions, OrbitSolution } from '../../engine/assess';
import { serveEngineJob } from './engineWorker';
import type { WorkerMessage } from './executor';

export interface AssessWorkerData {
  orbit: OrbitSolution;
  options: AssessOptions;
}

export type AssessProgress = { stage: string; done: number; total: number; rateClonesPerS: number | null; etaS: number | null };
export type AssessWorkerMessage = WorkerMessage<AssessProgress>;

await serveEngineJob<AssessWorkerData, AssessProgress>('assessWorker.ts', { type: AssessError, name: 'AssessError' }, ({ orbit, options }, { signal, onProgress }) =>
  assess(orbit, options, {
    signal,
    onProgress: (p) => onProgress({ stage: p.stage, done: p.done, total: p.total, rateClonesPerS: p.rateClonesPerS ?? null, etaS: p.etaS ?? null }),
  }),
);
