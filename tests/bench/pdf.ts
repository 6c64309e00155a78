/**
 * Bulletin PDF benchmark (`npm run bench:pdf`): prints figures, asserts nothing.
 *
 * The question: how long does the server's event loop stall while bulletin PDFs are laid out? Three PDFs (the test
 * fixture's bulletin and its long variant, tests/api/bulletinPdfFixture.ts, each a fresh layout) are rendered once on
 * the main thread (render.ts directly, as the server did before) and once through renderBulletinPdf (worker thread,
 * pool.ts), one after the other. perf_hooks.monitorEventLoopDelay (10 ms resolution) records the loop's delay over
 * each phase; printed: wall time, max and p99 delay per phase, and the main/worker ratio of both. The worker phase is
 * run once beforehand to start the thread and load its fonts (a server pays that once), so both phases compare
 * steady-state rendering. The machine is shared: figures vary from run to run; the ratio is the point.
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { bulletinVersionFixture } from '../api/bulletinPdfFixture';
import { clearBulletinPdfCache, closeBulletinPdfWorkers, renderBulletinPdf, type BulletinVersionForPdf } from '../../server/services/pdf';
import { renderBulletinPdfImpl } from '../../server/services/pdf/render';

const N = 3;

async function inputs(): Promise<BulletinVersionForPdf[]> {
  const short = (await bulletinVersionFixture()).version;
  const long = (await bulletinVersionFixture({ longBody: true })).version;
  return [short, long, { ...structuredClone(short), staleReason: 'benchmark' }].slice(0, N);
}

async function phase(label: string, render: (v: BulletinVersionForPdf) => Promise<Buffer>, versions: BulletinVersionForPdf[]) {
  const h = monitorEventLoopDelay({ resolution: 10 });
  const t0 = performance.now();
  h.enable();
  let bytes = 0;
  for (const v of versions) {
    clearBulletinPdfCache();
    bytes += (await render(v)).length;
  }
  h.disable();
  const wallMs = performance.now() - t0;
  const r = { label, wallMs, maxMs: h.max / 1e6, p99Ms: h.percentile(99) / 1e6, meanMs: h.mean / 1e6, bytes };
  console.log(
    `${label.padEnd(12)} wall ${wallMs.toFixed(0).padStart(6)} ms   loop delay max ${r.maxMs.toFixed(1).padStart(7)} ms` +
      `   p99 ${r.p99Ms.toFixed(1).padStart(7)} ms   mean ${r.meanMs.toFixed(1).padStart(6)} ms   (${N} PDFs, ${(bytes / 1024).toFixed(0)} kB)`,
  );
  return r;
}

const versions = await inputs();
// Warm both paths: main-thread modules and fonts, and the worker thread with its fonts.
await renderBulletinPdfImpl(versions[0]);
await renderBulletinPdf(versions[0]);

const main = await phase('main thread', renderBulletinPdfImpl, versions);
const worker = await phase('worker', renderBulletinPdf, versions);
console.log(
  `ratio main/worker: loop delay max ${(main.maxMs / worker.maxMs).toFixed(1)}x, p99 ${(main.p99Ms / worker.p99Ms).toFixed(1)}x` +
    `   (wall ${(main.wallMs / worker.wallMs).toFixed(2)}x)`,
);
console.log(JSON.stringify({ main, worker }));
await closeBulletinPdfWorkers();
