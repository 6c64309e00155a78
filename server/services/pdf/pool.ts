/**
 * Bulletin PDFs are laid out in a worker thread (piscina, as the Monte Carlo pool in server/engine/jobs/pool.ts):
 * pdfkit layout is synchronous CPU work of 0.7-2 s per PDF, which on the main thread would hold up every other
 * request.
 *
 * - One thread, started on the first PDF; further PDFs queue behind it (a PDF is rarely asked for, and the engine
 *   runs need the other core).
 * - The thread runs the TypeScript entry worker.ts through tsx (`execArgv: ['--import', 'tsx']`), also under vitest.
 * - An idle thread never keeps the process alive (piscina unrefs it) and ends itself after IDLE_TIMEOUT_MS;
 *   closeBulletinPdfWorkers() ends it at once (server shutdown). A later PDF starts a new pool.
 * - Output is the same bytes as on the main thread: the layout reads no clock, time zone or locale (render.ts), and
 *   the thread shares the process's environment.
 */
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { BulletinVersionForPdf } from './index';

const WORKER_FILE = fileURLToPath(new URL('./worker.ts', import.meta.url));
/** An idle thread ends after this long (its fonts are loaded again by the next one, some 100 ms). */
const IDLE_TIMEOUT_MS = 60_000;

let pool: Piscina<BulletinVersionForPdf, Uint8Array> | null = null;

function getPool(): Piscina<BulletinVersionForPdf, Uint8Array> {
  pool ??= new Piscina<BulletinVersionForPdf, Uint8Array>({
    filename: WORKER_FILE,
    execArgv: ['--import', 'tsx'],
    name: 'default',
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: IDLE_TIMEOUT_MS,
    concurrentTasksPerWorker: 1,
  });
  return pool;
}

/** Lay out one PDF in the worker thread; rejects with the renderer's own error message. */
export async function renderInWorker(version: BulletinVersionForPdf): Promise<Buffer> {
  const bytes = await getPool().run(version);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/** Stop the PDF thread (a PDF being laid out is rejected). Safe to call when none was started. */
export async function closeBulletinPdfWorkers(): Promise<void> {
  const p = pool;
  pool = null;
  if (p) await p.destroy();
}
