/**
 * Bulletin PDF (issue 6 item 5): renders one locked (approved) bulletin version to PDF with pdfkit.
 * Byte-stable: the same version gives the same bytes (fixed info dates from the approval time, a trailer ID
 * derived from the version hash, no current time anywhere). Layout constants and the standing caution live in
 * templates/pdf/.
 *
 * The input is the locked version exactly as stored (shared/schemas/bulletins.ts BulletinVersion: document, figure
 * snapshots, sign-off, SHA-256) plus what the PDF shows beside it: the office name, the object's name, the
 * distribution marking, and the frozen engine results of the runs the document embeds (risk tables and plots).
 */
import type { BulletinVersion } from '../../../shared/schemas/bulletins';

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

export async function renderBulletinPdf(version: BulletinVersionForPdf): Promise<Buffer> {
  const { renderBulletinPdfImpl } = await import('./render');
  return renderBulletinPdfImpl(version);
}
