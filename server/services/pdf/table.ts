/**
 * A simple table drawer for the bulletin PDF: column widths from shares of the box width, rows as tall as their
 * tallest cell, a header row repeated after a page break, rows never split across pages.
 */
import { COLOR, FONT_SIZE, SPACING } from '../../../templates/pdf/layout';
import type { FontSet } from './fonts';
import { paragraphHeight, writeParagraph, type Box, type Run } from './text';

export type Cell = Run[];
export type TableSpec = {
  /** Relative column widths (normalised to the box width). */
  shares: number[];
  header: Cell[] | null;
  rows: Cell[][];
  size?: number;
  align?: ('left' | 'right' | 'center')[];
};

function bottomLimit(doc: PDFKit.PDFDocument): number {
  return doc.page.height - doc.page.margins.bottom;
}

export function drawTable(doc: PDFKit.PDFDocument, fonts: FontSet, spec: TableSpec, box: Box): void {
  const size = spec.size ?? FONT_SIZE.table;
  const pad = SPACING.tableCellPadPt;
  const total = spec.shares.reduce((a, b) => a + b, 0);
  const widths = spec.shares.map((s) => (s / total) * box.width);
  const xs = widths.map((_, i) => box.x + widths.slice(0, i).reduce((a, b) => a + b, 0));
  const opts = { size, lineGap: 0.5 };

  const rowHeight = (cells: Cell[]) =>
    Math.max(...cells.map((c, i) => paragraphHeight(doc, c, widths[i] - 2 * pad, opts))) + 2 * pad + 1;

  let first = true; // the first row drawn on a page gets a top rule
  const drawRow = (cells: Cell[], header: boolean, stripe: boolean) => {
    const h = rowHeight(cells);
    const y = doc.y;
    if (header) doc.rect(box.x, y, box.width, h).fill(COLOR.tableHeaderFill);
    else if (stripe) doc.rect(box.x, y, box.width, h).fill(COLOR.stripeFill);
    cells.forEach((c, i) => {
      doc.y = y + pad;
      writeParagraph(doc, fonts, header ? c.map((r) => ({ ...r, bold: true })) : c, { x: xs[i] + pad, width: widths[i] - 2 * pad }, {
        ...opts,
        align: spec.align?.[i] ?? 'left',
      });
    });
    doc.lineWidth(0.5).strokeColor(COLOR.tableBorder);
    doc.moveTo(box.x, y + h).lineTo(box.x + box.width, y + h).stroke();
    if (header || first) doc.moveTo(box.x, y).lineTo(box.x + box.width, y).stroke();
    first = false;
    doc.y = y + h;
    doc.x = box.x;
  };

  const ensure = (h: number): boolean => {
    if (doc.y + h > bottomLimit(doc)) {
      doc.addPage();
      first = true;
      return true;
    }
    return false;
  };

  if (spec.header) {
    ensure(rowHeight(spec.header) + (spec.rows[0] ? rowHeight(spec.rows[0]) : 0));
    drawRow(spec.header, true, false);
  }
  spec.rows.forEach((row, r) => {
    if (ensure(rowHeight(row)) && spec.header) drawRow(spec.header, true, false);
    drawRow(row, false, r % 2 === 1);
  });
  doc.y += SPACING.blockGapPt;
}
