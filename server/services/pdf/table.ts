/**
 * A simple table drawer for the bulletin PDF: column widths from shares of the box width, rows as tall as their
 * tallest cell, a header row repeated after a page break, rows never split across pages.
 *
 * Merged cells: a cell may span columns (`rowSpans`, the colspan of each cell) and body rows (`cellRowspans`, the
 * rowspan of each cell; 0 marks a slot covered by a cell from a row above, which is not drawn). A cell spanning rows
 * is one box over them: its height is the sum of those rows' heights (the last of them grows when the cell needs more
 * room), its text starts at the top like every other cell, its background is one fill, and the rules between the rows
 * it spans stop at its sides (which get rules of their own). Rows joined by a span move to a new page together.
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
  /**
   * Body rows each cell spans (default 1), parallel to rows; 0 = a slot covered by a spanning cell above (not drawn).
   * Spans past the last row are cut at it.
   */
  cellRowspans?: number[][];
};

function bottomLimit(doc: PDFKit.PDFDocument): number {
  return doc.page.height - doc.page.margins.bottom;
}

type Placed = { col: number; x: number; width: number };

export function drawTable(doc: PDFKit.PDFDocument, fonts: FontSet, spec: TableSpec, box: Box): void {
  const size = spec.size ?? FONT_SIZE.table;
  const pad = SPACING.tableCellPadPt;
  const total = spec.shares.reduce((a, b) => a + b, 0);
  const widths = spec.shares.map((s) => (s / total) * box.width);
  const xs = widths.map((_, i) => box.x + widths.slice(0, i).reduce((a, b) => a + b, 0));
  const opts = { size, lineGap: 0.5 };

  /** x, width and first column of each cell of a row, from the spans. */
  const layout = (cells: Cell[], spans: number[] | undefined): Placed[] => {
    let col = 0;
    return cells.map((_, i) => {
      const span = Math.max(1, Math.min(spans?.[i] ?? 1, widths.length - col));
      const at = { col, x: xs[col] ?? box.x + box.width, width: widths.slice(col, col + span).reduce((a, b) => a + b, 0) };
      col += span;
      return at;
    });
  };
  const cellHeight = (c: Cell, at: Placed) => (at.width > 2 * pad ? paragraphHeight(doc, c, at.width - 2 * pad, opts) : 0) + 2 * pad + 1;

  const rows = spec.rows;
  /**
   * Rows of a span group too tall for one page: their spanning cells are drawn in their first row only (the covered
   * slots stay blank), so the rows can break across pages as ordinary rows.
   */
  const broken = new Set<number>();
  /** Rowspan of body cell i of row r: 0 covered, else 1..(rows left). */
  const rowspanOf = (r: number, i: number) => {
    const v = spec.cellRowspans?.[r]?.[i] ?? 1;
    if (v === 0) return 0;
    return broken.has(r) ? 1 : Math.max(1, Math.min(Math.floor(v), rows.length - r));
  };

  /** Height of a row from its own cells (spanning and covered ones left out). */
  const ownHeight = (cells: Cell[], spans: number[] | undefined, rowspans: ((i: number) => number) | null) => {
    const at = layout(cells, spans);
    return Math.max(2 * pad + 1, ...cells.map((c, i) => (rowspans && rowspans(i) !== 1 ? 0 : cellHeight(c, at[i]))));
  };

  let heights: number[] = [];
  const groupEnd: number[] = [];
  const plan = () => {
    // Body row heights: each row from its own cells, then the last row of each span grows when the spanning cell
    // needs more than the rows give it.
    heights = rows.map((cells, r) => ownHeight(cells, spec.rowSpans?.[r], (i) => rowspanOf(r, i)));
    rows.forEach((cells, r) => {
      const at = layout(cells, spec.rowSpans?.[r]);
      cells.forEach((c, i) => {
        const k = rowspanOf(r, i);
        if (k < 2) return;
        const have = heights.slice(r, r + k).reduce((a, b) => a + b, 0);
        const need = cellHeight(c, at[i]);
        if (need > have) heights[r + k - 1] += need - have;
      });
    });
    // Groups of rows joined by spans (kept on one page): a group ends where no span crosses the next row boundary.
    for (let r = 0; r < rows.length; ) {
      let end = r;
      for (let q = r; q <= end; q++) rows[q].forEach((_, i) => (end = Math.max(end, q + rowspanOf(q, i) - 1)));
      for (let q = r; q <= end; q++) groupEnd[q] = end;
      r = end + 1;
    }
  };
  const groupHeight = (r: number) => heights.slice(r, groupEnd[r] + 1).reduce((a, b) => a + b, 0);
  plan();
  const headerHeight = spec.header ? ownHeight(spec.header, spec.headerSpans, null) : 0;
  const pageRoom = doc.page.height - doc.page.margins.top - doc.page.margins.bottom - headerHeight;
  for (let r = 0; r < rows.length; r = groupEnd[r] + 1) {
    if (groupEnd[r] > r && groupHeight(r) > pageRoom) for (let q = r; q <= groupEnd[r]; q++) broken.add(q);
  }
  if (broken.size > 0) plan();

  const rule = (x0: number, x1: number, y: number) => {
    if (x1 - x0 > 0.01) doc.moveTo(x0, y).lineTo(x1, y).stroke();
  };
  const write = (c: Cell, at: Placed, y: number, header: boolean) => {
    if (at.width <= 2 * pad) return; // more cells than columns: nothing to draw into
    doc.y = y + pad;
    writeParagraph(doc, fonts, header ? c.map((run) => ({ ...run, bold: true })) : c, { x: at.x + pad, width: at.width - 2 * pad }, {
      ...opts,
      align: spec.align?.[at.col] ?? 'left',
    });
  };

  const drawHeader = (cells: Cell[]) => {
    const h = ownHeight(cells, spec.headerSpans, null);
    const at = layout(cells, spec.headerSpans);
    const y = doc.y;
    doc.rect(box.x, y, box.width, h).fill(COLOR.tableHeaderFill);
    cells.forEach((c, i) => write(c, at[i], y, true));
    doc.lineWidth(0.5).strokeColor(COLOR.tableBorder);
    rule(box.x, box.x + box.width, y + h);
    rule(box.x, box.x + box.width, y);
    doc.y = y + h;
    doc.x = box.x;
  };

  /** Draw body rows from..to (one group) starting at doc.y. */
  const drawGroup = (from: number, to: number) => {
    const top = doc.y;
    const ys = [top];
    for (let r = from; r <= to; r++) ys.push(ys[ys.length - 1] + heights[r]);
    const yOf = (r: number) => ys[r - from];
    const placed = rows.map((cells, r) => (r >= from && r <= to ? layout(cells, spec.rowSpans?.[r]) : []));
    // Backgrounds: the stripe of each row, then each spanning cell as one box in the fill of its first row.
    for (let r = from; r <= to; r++) if (r % 2 === 1) doc.rect(box.x, yOf(r), box.width, heights[r]).fill(COLOR.stripeFill);
    for (let r = from; r <= to; r++) {
      rows[r].forEach((_, i) => {
        const k = rowspanOf(r, i);
        if (k < 2) return;
        doc.rect(placed[r][i].x, yOf(r), placed[r][i].width, yOf(r + k) - yOf(r)).fill(r % 2 === 1 ? COLOR.stripeFill : '#ffffff');
      });
    }
    // Text at the top of each cell's box.
    for (let r = from; r <= to; r++) rows[r].forEach((c, i) => rowspanOf(r, i) > 0 && write(c, placed[r][i], yOf(r), false));
    // Rules: the top of the group (again after the first group on a page: this group's fills cover half of the rule
    // the group above drew); under each row, except across a cell that goes on below it; the sides of spanning cells.
    doc.lineWidth(0.5).strokeColor(COLOR.tableBorder);
    rule(box.x, box.x + box.width, top);
    const continuing: [number, number][][] = Array.from({ length: to - from + 1 }, () => []); // per row: x ranges spanned on below it
    for (let r = from; r <= to; r++) {
      rows[r].forEach((_, i) => {
        const k = rowspanOf(r, i);
        if (k < 2) return;
        const { x, width } = placed[r][i];
        for (let q = r; q < r + k - 1; q++) continuing[q - from].push([x, x + width]);
        if (x > box.x + 0.01) doc.moveTo(x, yOf(r)).lineTo(x, yOf(r + k)).stroke();
        if (x + width < box.x + box.width - 0.01) doc.moveTo(x + width, yOf(r)).lineTo(x + width, yOf(r + k)).stroke();
      });
    }
    for (let r = from; r <= to; r++) {
      const gaps = continuing[r - from].sort((a, b) => a[0] - b[0]);
      let x0 = box.x;
      for (const [a, b] of gaps) {
        rule(x0, a, yOf(r + 1));
        x0 = Math.max(x0, b);
      }
      rule(x0, box.x + box.width, yOf(r + 1));
    }
    doc.y = yOf(to + 1);
    doc.x = box.x;
  };

  const ensure = (h: number): boolean => {
    if (doc.y + h > bottomLimit(doc)) {
      doc.addPage();
      return true;
    }
    return false;
  };

  const header = spec.header;
  if (header) {
    ensure(headerHeight + (rows.length > 0 ? groupHeight(0) : 0));
    drawHeader(header);
  }
  for (let r = 0; r < rows.length; r = groupEnd[r] + 1) {
    if (ensure(groupHeight(r)) && header) drawHeader(header);
    drawGroup(r, groupEnd[r]);
  }
  doc.y += SPACING.blockGapPt;
}
