/**
 * Bulletin PDF (issue 6 item 5): renders one locked (approved) bulletin version to PDF with pdfkit.
 * Byte-stable: the same version gives the same bytes (fixed info dates from the approval time, a trailer ID
 * derived from the version hash, no current time anywhere). Layout constants and the standing caution live in
 * templates/pdf/.
 *
 * The input is everything the PDF needs, already frozen with the version: the document, the figure snapshots,
 * the engine results of the runs the document embeds (risk tables and plots), and the sign-off.
 */

/** A TipTap/ProseMirror JSON node (shared/bulletins/document.ts validates the full shape). */
export type PdfDocNode = {
  type: string;
  attrs?: Record<string, unknown>;
  content?: PdfDocNode[];
  text?: string;
  marks?: { type: string; attrs?: Record<string, unknown> }[];
};

/** A frozen figure value (shared/bulletins/figures.ts FigureValue); only the fields the PDF reads are required. */
export type PdfFigureSnapshot = {
  quantity: string;
  runId: number;
  text: string;
  approach?: { body: string; epochTdbJd: number } | null;
  [k: string]: unknown;
};

export type BulletinVersionForPdf = {
  bulletinId: number;
  /** Bulletin number as shown to readers, e.g. "2026-014". */
  bulletinNumber: string;
  version: number;
  officeName: string;
  object: { designation: string; name: string | null };
  title: string;
  /** Distribution marking, e.g. "OFFICIAL - for government liaisons". */
  distributionMarking: string;
  /** ISO 8601 UTC time of approval (the version's freezing time; used for the dates in the PDF). */
  approvedAtUtc: string;
  /** SHA-256 (hex) of the version's canonical JSON. */
  sha256: string;
  document: PdfDocNode;
  /** Snapshot of every linked figure, in document order (matched to linkedFigure nodes by their attrs). */
  figures: PdfFigureSnapshot[];
  /** Engine assess JSON of each run embedded by a riskTable or plot node, keyed by run id. */
  runs: Record<string, { runId: number; result: Record<string, unknown> }>;
  author: { name: string };
  signOff: {
    reviewer: { name: string };
    atUtc: string;
    comment: string | null;
    /** Texts of the figures the reviewer confirmed. */
    confirmedFigures: PdfFigureSnapshot[];
  };
};

export async function renderBulletinPdf(version: BulletinVersionForPdf): Promise<Buffer> {
  const { renderBulletinPdfImpl } = await import('./render');
  return renderBulletinPdfImpl(version);
}
