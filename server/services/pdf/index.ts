/**
 * Bulletin PDF (issue 6 item 5): renders one locked (approved) bulletin version to PDF with pdfkit, in a worker thread
 * (pool.ts; the layout itself is render.ts).
 * Byte-stable: the same version gives the same bytes (fixed info dates from the approval time, a trailer ID
 * derived from the version hash, no current time anywhere). Layout constants and the standing caution live in
 * templates/pdf/.
 *
 * The input is the locked version exactly as stored (shared/schemas/bulletins.ts BulletinVersion: document, figure
 * snapshots, sign-off, SHA-256) plus what the PDF shows beside it: the office name, the object's name, the
 * distribution marking, and the frozen engine results of the runs the document embeds (risk tables and plots).
 */
import { createHash } from 'node:crypto';
import type { BulletinVersion } from '../../../shared/schemas/bulletins';
import { renderInWorker } from './pool';

export { closeBulletinPdfWorkers } from './pool';

export type BulletinVersionForPdf = BulletinVersion & {
  officeName: string;
  /** The object's name (its designation is in the version), null when it has none. */
  objectName: string | null;
  /** Distribution marking printed in the title block and the footer, e.g. "OFFICIAL - government liaisons only". */
  distributionMarking: string;
  /**
   * The engine assess JSON (`result` of the run) of each run in `runIds`, keyed by run id. Risk tables and plots are
   * drawn from these; linked figures come from the version's own snapshots.
   */
  runs: Record<string, { runId: number; result: unknown }>;
};

/**
 * Recently rendered PDFs by a hash of their whole input (the output is a pure function of it), so a download right
 * after a distribution, or the same version sent to many lists, is not laid out again. Concurrent requests for the
 * same input share one rendering. Small: a few PDFs of some 50-500 kB.
 */
const CACHE_SIZE = 8;
const cache = new Map<string, Promise<Buffer>>();

export async function renderBulletinPdf(version: BulletinVersionForPdf): Promise<Buffer> {
  const key = createHash('sha256').update(JSON.stringify(version)).digest('hex');
  let pending = cache.get(key);
  if (pending) {
    cache.delete(key); // most recently used goes last
  } else {
    // Laid out in a worker thread (pool.ts), so the server's event loop stays free meanwhile.
    pending = renderInWorker(version);
    pending.catch(() => cache.delete(key));
  }
  cache.set(key, pending);
  while (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value!);
  // A copy: callers may not change the cached bytes.
  return Buffer.from(await pending);
}

/** Forget cached PDFs (tests that must measure a fresh rendering). */
export function clearBulletinPdfCache(): void {
  cache.clear();
}
