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
  /** Columns each cell spans (default 1), parallel to header / rows. */
  headerSpans?: number[];
  rowSpans?: number[][];
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

  /** x, width and first column of each cell of a row, from the spans. */
  const layout = (cells: Cell[], spans: number[] | undefined) => {
    let col = 0;
    return cells.map((_, i) => {
      const span = Math.max(1, Math.min(spans?.[i] ?? 1, widths.length - col));
      const at = { col, x: xs[col] ?? box.x + box.width, width: widths.slice(col, col + span).reduce((a, b) => a + b, 0) };
      col += span;
      return at;
    });
  };

  const rowHeight = (cells: Cell[], spans?: number[]) => {
    const at = layout(cells, spans);
    return Math.max(0, ...cells.map((c, i) => (at[i].width > 2 * pad ? paragraphHeight(doc, c, at[i].width - 2 * pad, opts) : 0))) + 2 * pad + 1;
  };

  let first = true; // the first row drawn on a page gets a top rule
  const drawRow = (cells: Cell[], header: boolean, stripe: boolean, spans?: number[]) => {
    const h = rowHeight(cells, spans);
    const at = layout(cells, spans);
    const y = doc.y;
    if (header) doc.rect(box.x, y, box.width, h).fill(COLOR.tableHeaderFill);
    else if (stripe) doc.rect(box.x, y, box.width, h).fill(COLOR.stripeFill);
    cells.forEach((c, i) => {
      if (at[i].width <= 2 * pad) return; // more cells than columns: nothing to draw into
      doc.y = y + pad;
      writeParagraph(doc, fonts, header ? c.map((r) => ({ ...r, bold: true })) : c, { x: at[i].x + pad, width: at[i].width - 2 * pad }, {
        ...opts,
        align: spec.align?.[at[i].col] ?? 'left',
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

  const header = spec.header;
  if (header) {
    ensure(rowHeight(header, spec.headerSpans) + (spec.rows[0] ? rowHeight(spec.rows[0], spec.rowSpans?.[0]) : 0));
    drawRow(header, true, false, spec.headerSpans);
  }
  spec.rows.forEach((row, r) => {
    if (ensure(rowHeight(row, spec.rowSpans?.[r])) && header) drawRow(header, true, false, spec.headerSpans);
    drawRow(row, false, r % 2 === 1, spec.rowSpans?.[r]);
  });
  doc.y += SPACING.blockGapPt;
}
