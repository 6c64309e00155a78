/**
 * Bulletin PDFs in a worker thread (server/services/pdf/pool.ts): the server's event loop keeps running while a PDF
 * is laid out, errors keep their message, and the thread can be stopped and started again. Byte stability of the
 * output is checked in tests/api/bulletin-pdf.test.ts.
 *
 * The input is the PDF test fixture with one large table as its whole body: on the main thread, the layout of one
 * top-level block is a single synchronous stretch (render.ts only yields between blocks), so this is the case the
 * worker thread is for.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clearBulletinPdfCache, closeBulletinPdfWorkers, renderBulletinPdf, type BulletinVersionForPdf } from '../../server/services/pdf';
import { bulletinVersionFixture } from '../api/bulletinPdfFixture';

let version: BulletinVersionForPdf;
let bigTable: BulletinVersionForPdf;

const TICK_MS = 50;

beforeAll(async () => {
  ({ version } = await bulletinVersionFixture());
  const cell = (text: string) => ({ type: 'tableCell' as const, content: [{ type: 'paragraph' as const, content: [{ type: 'text' as const, text }] }] });
  bigTable = structuredClone(version);
  bigTable.document = {
    type: 'doc',
    content: [
      {
        type: 'table',
        content: Array.from({ length: 600 }, (_, i) => ({
          type: 'tableRow' as const,
          content: [cell(`Row ${i + 1}`), cell(`${(i * 0.137).toFixed(3)} au, entry with a few words to wrap over the cell width`), cell(`note ${i}`)],
        })),
      },
    ],
  };
  // Start the thread and load its fonts before the timed part (a server pays that once).
  await renderBulletinPdf(version);
}, 120_000);

afterAll(() => closeBulletinPdfWorkers());

describe('PDF rendering off the main thread', () => {
  it('keeps the event loop responsive while a PDF is laid out (a 50 ms interval keeps firing)', async () => {
    clearBulletinPdfCache();
    let ticks = 0;
    const timer = setInterval(() => ticks++, TICK_MS);
    const t0 = performance.now();
    let pdf: Buffer;
    try {
      pdf = await renderBulletinPdf(bigTable);
    } finally {
      clearInterval(timer);
    }
    const elapsedMs = performance.now() - t0;
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    if (elapsedMs < 300) {
      // Too quick to tell a blocked loop from a free one: nothing to check (the render still had to succeed).
      console.log(`pdf-worker: the render took ${elapsedMs.toFixed(0)} ms (< 300 ms), responsiveness not checked`);
      return;
    }
    // A free loop ticks about elapsed/50 times; a loop held by the layout ticks only between blocks (here: a handful
    // of times at most). Generous on a loaded machine: 3 ticks, or 2 for a render under 500 ms.
    console.log(`pdf-worker: ${ticks} ticks of ${TICK_MS} ms during a ${elapsedMs.toFixed(0)} ms render`);
    expect(ticks).toBeGreaterThanOrEqual(elapsedMs >= 500 ? 3 : 2);
  }, 120_000);

  it('rejects with the renderer’s own message', async () => {
    await expect(renderBulletinPdf({ ...version, sha256: 'xyz' })).rejects.toThrow('renderBulletinPdf: sha256 must be 64 hex digits');
  }, 60_000);

  it('renders again after the thread was stopped, to the same bytes', async () => {
    clearBulletinPdfCache();
    const before = await renderBulletinPdf(version);
    await closeBulletinPdfWorkers();
    await closeBulletinPdfWorkers(); // twice is harmless
    clearBulletinPdfCache();
    const after = await renderBulletinPdf(version);
    expect(after.equals(before)).toBe(true);
  }, 60_000);
});
