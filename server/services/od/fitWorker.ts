// Worker-thread entry point of one orbit fit (started by fitRunner.ts through runWorkerJob, one thread per fit,
// so the engine never blocks the server's event loop). Receives the fit input in workerData, runs the engine's
// determineOrbit() with its progress and abort hooks, and posts back (runs/engineWorker.ts; protocol of runs/executor.ts WorkerMessage):
//   {type:'progress', stage, done, total}
//   {type:'result', json}                       (the OrbitDeterminationResult as JSON text)
//   {type:'error', name, code, message, details}
// determineOrbit is synchronous, so an {type:'abort'} message is only seen between engine steps when the engine
// yields; the runner terminates the thread after a short grace in any case (executor.ts).
import { determineOrbit, OrbitDeterminationError } from '../../engine/od';
import type { FitSettings, Observatory, OpticalObservation } from '../../../shared/schemas/od';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import { serveEngineJob } from '../runs/engineWorker';

export interface FitWorkerData {
  observations: OpticalObservation[];
  observatories: Observatory[];
  settings: FitSettings;
  initialOrbit: NormalizedOrbit | null;
}

export type FitProgress = { stage: string; done: number; total: number };

await serveEngineJob<FitWorkerData, FitProgress>(
  'fitWorker.ts',
  { type: OrbitDeterminationError, name: 'OrbitDeterminationError' },
  (input, { signal, onProgress }) =>
    determineOrbit(
      { observations: input.observations, observatories: input.observatories, settings: input.settings, initialOrbit: input.initialOrbit },
      { signal, onProgress: (p) => onProgress({ stage: p.stage, done: p.done, total: p.total }) },
    ),
);
