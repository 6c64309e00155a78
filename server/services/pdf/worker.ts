/**
 * Worker-thread entry for bulletin PDFs (piscina; loaded through tsx, see pool.ts). The thread keeps its modules, so
 * the fonts (fonts.ts converts the .woff files once per process) are loaded once per worker, not once per PDF.
 * The answer is the PDF's bytes; a thrown error reaches the caller with its message (piscina re-throws it there).
 */
import type { BulletinVersionForPdf } from './index';
import { renderBulletinPdfImpl } from './render';

export default async function renderInWorker(version: BulletinVersionForPdf): Promise<Uint8Array> {
  return renderBulletinPdfImpl(version);
}
