// Entry file of the orbit-fit worker thread (fitRunner.ts). Plain JavaScript so Node can start it without a
// TypeScript loader; it registers tsx in this thread and loads the TypeScript worker.
import { register } from 'tsx/esm/api';

register();
await import('./fitWorker.ts');
