/**
 * The bulletin PDF renderer (issue 6 item 5). Layout constants and standing texts: templates/pdf/layout.ts.
 *
 * Byte stability: pdfkit's only sources of variation are the info dictionary's CreationDate (default: now) and the
 * trailer /ID (an MD5 of the info dictionary, pdfkit 0.20 PDFSecurity.generateFileID). Both are pinned here: the
 * dates are the version's approval time and the ID is the first 16 bytes of the version's SHA-256. Font subset tags
 * are derived from pdfkit's font ids (F1, F2 ...), which follow the order fonts are first used in the document, the
 * same for the same input; deflate output is deterministic. Nothing reads the clock or the locale.
 */
import PDFDocument from 'pdfkit';
import {
  FIGURE_QUANTITY_LABELS,
  linkedFigureAttrsSchema,
  type DocNode as PdfDocNode,
  type FigureQuantity,
  type FigureValue,
} from '../../../shared/bulletins/document';
import { COLOR, FONT_SIZE, PAGE, PLOT, PRODUCER, SPACING, STANDING_CAUTION } from '../../../templates/pdf/layout';
import { FontSet, primaryFont } from './fonts';
import type { BulletinVersionForPdf } from './index';
import { drawPlot } from './plots';
import { riskTableSpec } from './riskTable';
import { drawTable } from './table';
import { measureLinesWhole, paragraphHeight, writeParagraph, type Box, type Run } from './text';

type Ctx = {
  doc: PDFKit.PDFDocument;
  fonts: FontSet;
  version: BulletinVersionForPdf;
  /** Linked figures met so far (document order). */
  figureIndex: number;
  /** Figures shown in the body with their footnote number, for the list of figures at the end. */
  shown: { n: number; figure: FigureValue | null; attrs: Record<string, unknown> }[];
};

function authorName(v: BulletinVersionForPdf): string {
  return v.author?.name ?? 'unknown author';
}

function bottomLimit(doc: PDFKit.PDFDocument): number {
  return doc.page.height - doc.page.margins.bottom;
}

/** Start a new page unless `h` points still fit. */
function ensureSpace(doc: PDFKit.PDFDocument, h: number): void {
  if (doc.y + h > bottomLimit(doc)) doc.addPage();
}

function fullBox(doc: PDFKit.PDFDocument): Box {
  return { x: doc.page.margins.left, width: doc.page.width - doc.page.margins.left - doc.page.margins.right };
}

/** "2026-12-01 14:05 UTC" from an ISO time. */
function utcText(iso: string): string {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})/.exec(iso);
  return m ? `${m[1]} ${m[2]} UTC` : iso;
}

/** A bookmark (PDF outline entry) for a heading, pointing at the current page. */
function outline(ctx: Ctx, title: string): void {
  const t = title.replace(/\s+/g, ' ').trim();
  if (t) ctx.doc.outline.addItem(t);
}

// ---------------------------------------------------------------------------------------------------------------
// Inline content

function figureFor(ctx: Ctx, attrs: Record<string, unknown>): FigureValue | null {
  const i = ctx.figureIndex++;
  const parsed = linkedFigureAttrsSchema.safeParse(attrs);
  if (!parsed.success) return null;
  const a = parsed.data;
  const same = (s: { attrs: { runId: number; quantity: string; body: string | null; epochTdbJd: number | null } }) =>
    s.attrs.runId === a.runId && s.attrs.quantity === a.quantity && s.attrs.body === a.body && s.attrs.epochTdbJd === a.epochTdbJd;
  // Snapshots are keyed by the figure's position among linked figures (document order); check the binding too.
  const byIndex = ctx.version.figures.find((f) => f.index === i);
  if (byIndex && same(byIndex)) return byIndex.value;
  return ctx.version.figures.find(same)?.value ?? null;
}

function inlineRuns(ctx: Ctx, nodes: PdfDocNode[] | undefined, base: Partial<Run> = {}): Run[] {
  const runs: Run[] = [];
  for (const n of nodes ?? []) {
    if (n.type === 'text') {
      const marks = new Set((n.marks ?? []).map((m) => m.type));
      const link = (n.marks ?? []).find((m) => m.type === 'link')?.attrs?.href;
      const small = marks.has('subscript') || marks.has('superscript');
      runs.push({
        ...base,
        text: n.text ?? '',
        bold: base.bold || marks.has('bold'),
        italic: base.italic || marks.has('italic'),
        underline: marks.has('underline'),
        strike: marks.has('strike'),
        link: typeof link === 'string' ? link : null,
        color: marks.has('code') ? COLOR.accent : base.color,
        size: small && base.size ? base.size * 0.75 : small ? FONT_SIZE.body * 0.75 : base.size,
        raise: marks.has('superscript'),
      });
    } else if (n.type === 'hardBreak') {
      runs.push({ ...base, text: '\n' });
    } else if (n.type === 'linkedFigure') {
      const attrs = n.attrs ?? {};
      const figure = figureFor(ctx, attrs);
      const num = ctx.shown.length + 1;
      ctx.shown.push({ n: num, figure, attrs });
      const text = figure ? figure.text : `[figure ${num}: no frozen value]`;
      runs.push({ ...base, text, bold: true, color: COLOR.accent });
      runs.push({ ...base, text: ` [${num}]`, color: COLOR.muted, size: FONT_SIZE.figureRun, raise: true });
    } else if (n.type === 'image') {
      const alt = typeof n.attrs?.alt === 'string' && n.attrs.alt ? n.attrs.alt : 'image';
      runs.push({ ...base, text: `[${alt}]`, italic: true, color: COLOR.muted });
    } else if (n.content) {
      runs.push(...inlineRuns(ctx, n.content, base));
    }
  }
  return runs;
}

// ---------------------------------------------------------------------------------------------------------------
// Blocks

function paragraph(ctx: Ctx, runs: Run[], box: Box, size = FONT_SIZE.body, after = SPACING.paragraphAfterPt): void {
  const { doc } = ctx;
  doc.font(primaryFont('regular')).fontSize(size);
  const line = doc.currentLineHeight(true) + SPACING.lineGapPt;
  const h = paragraphHeight(doc, runs, box.width, { size });
  const room = bottomLimit(doc) - doc.y;
  const pageRoom = doc.page.height - doc.page.margins.top - doc.page.margins.bottom;
  if (h > room && h - room < 1.5 * line && h < pageRoom / 2) {
    // Only its last line would go over: start the paragraph on the next page (no widow line at the top).
    doc.addPage();
  } else {
    // Keep at least two lines of a paragraph on a page (no orphan line at the bottom).
    ensureSpace(doc, Math.min(h, 2 * line + 2));
  }
  writeParagraph(doc, ctx.fonts, runs, box, { size });
  doc.y += after;
}

function headingSize(level: number): number {
  return level <= 1 ? FONT_SIZE.h1 : level === 2 ? FONT_SIZE.h2 : FONT_SIZE.h3;
}

function heading(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const level = typeof node.attrs?.level === 'number' ? node.attrs.level : 2;
  const size = headingSize(level);
  const runs = inlineRuns(ctx, node.content, { bold: true, size });
  doc.y += SPACING.headingBeforePt;
  // Keep the heading with the first lines of what follows it.
  ensureSpace(doc, paragraphHeight(doc, runs, box.width, { size }) + 3 * FONT_SIZE.body * 1.4);
  outline(ctx, runs.map((r) => r.text).join(''));
  writeParagraph(ctx.doc, ctx.fonts, runs, box, { size });
  doc.y += SPACING.headingAfterPt;
}

function list(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const ordered = node.type === 'orderedList';
  let counter = typeof node.attrs?.start === 'number' ? node.attrs.start : 1;
  const inner: Box = { x: box.x + SPACING.listIndentPt, width: box.width - SPACING.listIndentPt };
  for (const item of node.content ?? []) {
    const marker = ordered ? `${counter++}.` : '•';
    doc.font(primaryFont('regular')).fontSize(FONT_SIZE.body);
    // At least what the item's first paragraph will ask for, so the marker never stays behind on the page before.
    ensureSpace(doc, 2 * doc.currentLineHeight(true) + 8);
    const y = doc.y;
    doc.fillColor(COLOR.text).text(marker, box.x, y, { width: SPACING.listIndentPt - 3, align: ordered ? 'right' : 'left', lineBreak: false });
    doc.x = inner.x;
    doc.y = y;
    blocks(ctx, item.content, inner, SPACING.listItemAfterPt);
  }
  doc.y += SPACING.paragraphAfterPt - SPACING.listItemAfterPt;
}

function blockquote(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const y0 = doc.y;
  const page0 = doc.bufferedPageRange().count;
  blocks(ctx, node.content, { x: box.x + 12, width: box.width - 12 });
  if (doc.bufferedPageRange().count === page0) {
    doc.lineWidth(2).strokeColor(COLOR.rule).moveTo(box.x + 3, y0).lineTo(box.x + 3, doc.y - SPACING.paragraphAfterPt).stroke();
  }
}

function docTable(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const rows = (node.content ?? []).filter((r) => r.type === 'tableRow');
  if (rows.length === 0) return;
  const cellRuns = (cell: PdfDocNode): Run[] => {
    const out: Run[] = [];
    (cell.content ?? []).forEach((p, i) => {
      if (i > 0) out.push({ text: '\n' });
      out.push(...inlineRuns(ctx, p.type === 'paragraph' || p.type === 'heading' ? p.content : [p]));
    });
    return out;
  };
  const first = rows[0].content ?? [];
  const headerRow = first.length > 0 && first.every((c) => c.type === 'tableHeader');
  const num = (v: unknown, d: number) => (typeof v === 'number' && Number.isInteger(v) && v >= 1 ? Math.min(v, 50) : d);
  // Place cells on a grid: colspan widens a cell; a rowspan keeps its columns free in the rows below, where the slots
  // are marked covered (rowspan 0) and table.ts draws the merged cell as one box across its rows.
  const occupied: number[] = []; // per column: rows still covered by a rowspan from above
  const grid: { cells: Run[][]; spans: number[]; rowspans: number[] }[] = [];
  let cols = 1;
  for (const r of rows) {
    const cells: Run[][] = [];
    const spans: number[] = [];
    const rowspans: number[] = [];
    let col = 0;
    const skipCovered = () => {
      while ((occupied[col] ?? 0) > 0) {
        cells.push([]);
        spans.push(1);
        rowspans.push(0);
        col++;
      }
    };
    for (const c of r.content ?? []) {
      skipCovered();
      const colspan = num(c.attrs?.colspan, 1);
      const rowspan = num(c.attrs?.rowspan, 1);
      cells.push(cellRuns(c));
      spans.push(colspan);
      rowspans.push(rowspan);
      for (let k = 0; k < colspan; k++) occupied[col + k] = Math.max(occupied[col + k] ?? 0, rowspan);
      col += colspan;
    }
    skipCovered();
    cols = Math.max(cols, col);
    grid.push({ cells, spans, rowspans });
    for (let k = 0; k < occupied.length; k++) if ((occupied[k] ?? 0) > 0) occupied[k]--;
  }
  for (const g of grid) {
    const used = g.spans.reduce((a, b) => a + b, 0);
    for (let k = used; k < cols; k++) {
      g.cells.push([]);
      g.spans.push(1);
      g.rowspans.push(1);
    }
  }
  // Column widths from the editor's resized widths (colwidth, px) when the first row gives them all.
  const widthsPx: number[] = [];
  for (const c of first) {
    const cw = c.attrs?.colwidth;
    const span = num(c.attrs?.colspan, 1);
    for (let k = 0; k < span; k++) widthsPx.push(Array.isArray(cw) && typeof cw[k] === 'number' && cw[k] > 0 ? cw[k] : NaN);
  }
  const shares = widthsPx.length === cols && widthsPx.every((w) => Number.isFinite(w)) ? widthsPx : Array(cols).fill(1);
  const body = grid.slice(headerRow ? 1 : 0);
  drawTable(
    ctx.doc,
    ctx.fonts,
    {
      shares,
      header: headerRow ? grid[0].cells : null,
      headerSpans: headerRow ? grid[0].spans : undefined,
      rows: body.map((g) => g.cells),
      rowSpans: body.map((g) => g.spans),
      cellRowspans: body.map((g) => g.rowspans),
      size: FONT_SIZE.table + 0.5,
    },
    box,
  );
}

function image(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const src = typeof node.attrs?.src === 'string' ? node.attrs.src : '';
  const alt = typeof node.attrs?.alt === 'string' && node.attrs.alt ? node.attrs.alt : 'image';
  const m = /^data:image\/(png|jpe?g);base64,(.+)$/i.exec(src);
  if (m) {
    try {
      const buf = Buffer.from(m[2], 'base64');
      const img = (doc as unknown as { openImage(b: Buffer): { width: number; height: number } }).openImage(buf);
      const w = Math.min(box.width, img.width);
      const h = (img.height / img.width) * w;
      const hh = Math.min(h, 320);
      ensureSpace(doc, hh + 16);
      doc.image(buf, box.x + (box.width - (w * hh) / h) / 2, doc.y, { fit: [w, hh] });
      doc.y += hh + 3;
      if (typeof node.attrs?.alt === 'string' && node.attrs.alt) {
        writeParagraph(doc, ctx.fonts, [{ text: node.attrs.alt, italic: true, color: COLOR.muted }], box, { size: FONT_SIZE.plotCaption, align: 'center' });
      }
      doc.y += SPACING.blockGapPt;
      return;
    } catch {
      // fall through to the alt text
    }
  }
  paragraph(ctx, [{ text: `[${alt}: external image, not embedded]`, italic: true, color: COLOR.muted }], box);
}

function block(ctx: Ctx, node: PdfDocNode, box: Box, after = SPACING.paragraphAfterPt): void {
  const { doc } = ctx;
  switch (node.type) {
    case 'paragraph':
      paragraph(ctx, inlineRuns(ctx, node.content), box, FONT_SIZE.body, after);
      return;
    case 'heading':
      heading(ctx, node, box);
      return;
    case 'bulletList':
    case 'orderedList':
      list(ctx, node, box);
      return;
    case 'blockquote':
      blockquote(ctx, node, box);
      return;
    case 'codeBlock':
      paragraph(ctx, inlineRuns(ctx, node.content, { color: COLOR.accent }), { x: box.x + 8, width: box.width - 8 }, FONT_SIZE.table + 0.5, after);
      return;
    case 'horizontalRule':
      ensureSpace(doc, 12);
      doc.y += 4;
      doc.lineWidth(0.5).strokeColor(COLOR.rule).moveTo(box.x, doc.y).lineTo(box.x + box.width, doc.y).stroke();
      doc.y += 8;
      return;
    case 'table':
      docTable(ctx, node, box);
      return;
    case 'image':
      image(ctx, node, box);
      return;
    case 'riskTable':
      riskTable(ctx, node, box);
      return;
    case 'plot':
      plot(ctx, node, box);
      return;
    default:
      // Unknown block: its inline content as a paragraph (never silently dropped).
      if (node.content) paragraph(ctx, inlineRuns(ctx, node.content), box, FONT_SIZE.body, after);
  }
}

function blocks(ctx: Ctx, nodes: PdfDocNode[] | undefined, box: Box, after = SPACING.paragraphAfterPt): void {
  for (const n of nodes ?? []) block(ctx, n, box, after);
}

function runResult(ctx: Ctx, runId: unknown): Record<string, unknown> | null {
  if (typeof runId !== 'number') return null;
  const r = ctx.version.runs[String(runId)]?.result;
  return r && typeof r === 'object' ? (r as Record<string, unknown>) : null;
}

function caption(ctx: Ctx, text: string, box: Box): void {
  const { doc } = ctx;
  writeParagraph(doc, ctx.fonts, [{ text, bold: true }], box, { size: FONT_SIZE.plotCaption });
  doc.y += 3;
}

function riskTable(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const runId = node.attrs?.runId;
  const result = runResult(ctx, runId);
  doc.y += 2;
  if (!result) {
    paragraph(ctx, [{ text: `[risk table: the result of run ${String(runId)} was not frozen with this version]`, italic: true, color: COLOR.accent }], box);
    return;
  }
  const spec = riskTableSpec(result);
  ensureSpace(doc, 60);
  caption(ctx, `Encounters of ${String(result.object ?? 'the object')} (run ${String(runId)}, analysis date ${utcText(String(result.analysisDateUtc ?? ''))})`, box);
  drawTable(doc, ctx.fonts, spec.table, box);
  if (spec.notes.length > 0) {
    for (const note of spec.notes) writeParagraph(doc, ctx.fonts, [{ text: note, color: COLOR.muted }], box, { size: FONT_SIZE.table });
    doc.y += SPACING.blockGapPt;
  }
}

function plot(ctx: Ctx, node: PdfDocNode, box: Box): void {
  const { doc } = ctx;
  const attrs = node.attrs ?? {};
  const runId = attrs.runId;
  const result = runResult(ctx, runId);
  const kind = attrs.kind === 'distance' ? 'distance' : 'bplane';
  const body = typeof attrs.body === 'string' ? attrs.body : 'earth';
  const epoch = typeof attrs.epochTdbJd === 'number' ? attrs.epochTdbJd : NaN;
  const w = box.width * PLOT.widthShare;
  const h = w * PLOT.aspect;
  ensureSpace(doc, h + 30);
  const title = `${kind === 'bplane' ? 'B-plane' : 'Distance'} plot, ${body}, run ${String(runId)}`;
  caption(ctx, title, box);
  if (!result) {
    paragraph(ctx, [{ text: `[plot: the result of run ${String(runId)} was not frozen with this version]`, italic: true, color: COLOR.accent }], box);
    return;
  }
  const y = doc.y;
  const drawn = drawPlot(doc, { kind, result, body, epochTdbJd: epoch }, { x: box.x + (box.width - w) / 2, y, width: w, height: h }, ctx.fonts);
  if (drawn.ok) {
    doc.y = y + h + SPACING.blockGapPt;
    doc.x = box.x;
  } else {
    paragraph(ctx, [{ text: `[plot not drawn: ${drawn.reason}]`, italic: true, color: COLOR.accent }], box);
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Fixed parts: title block, caution, figure list, sign-off, footer

function titleBlock(ctx: Ctx): void {
  const { doc, version: v, fonts } = ctx;
  const box = fullBox(doc);
  outline(ctx, v.title);
  writeParagraph(doc, fonts, [{ text: v.officeName.toUpperCase(), bold: true, color: COLOR.muted }], box, { size: FONT_SIZE.office });
  doc.y += 4;
  writeParagraph(doc, fonts, [{ text: v.title, bold: true }], box, { size: FONT_SIZE.title });
  doc.y += 2;
  const objectText = v.objectName ? `${v.objectDesignation} (${v.objectName})` : v.objectDesignation;
  writeParagraph(doc, fonts, [{ text: `Object ${objectText}` }], box, { size: FONT_SIZE.subtitle });
  doc.y += 3;
  writeParagraph(
    doc,
    fonts,
    [
      { text: `Bulletin ${v.number}, version ${v.version}`, bold: true },
      { text: `   ·   Approved ${utcText(v.signOff.approvedAt)}   ·   Drafted by ${authorName(v)}` },
    ],
    box,
    { size: FONT_SIZE.meta, color: COLOR.muted },
  );
  doc.y += 6;
  // Distribution marking, boxed.
  const markRuns: Run[] = [{ text: v.distributionMarking, bold: true, color: COLOR.markingBorder }];
  const mh = paragraphHeight(doc, markRuns, box.width - 12, { size: FONT_SIZE.marking });
  const y = doc.y;
  doc.lineWidth(1).strokeColor(COLOR.markingBorder).rect(box.x, y, box.width, mh + 8).stroke();
  doc.y = y + 4;
  writeParagraph(doc, fonts, markRuns, { x: box.x + 6, width: box.width - 12 }, { size: FONT_SIZE.marking, align: 'center' });
  doc.y = y + mh + 8 + 8;
  doc.lineWidth(0.75).strokeColor(COLOR.rule).moveTo(box.x, doc.y).lineTo(box.x + box.width, doc.y).stroke();
  doc.y += 10;
}

function caution(ctx: Ctx): void {
  const { doc, fonts } = ctx;
  const box = fullBox(doc);
  const runs: Run[] = [{ text: 'Standing caution. ', bold: true }, { text: STANDING_CAUTION, italic: true }];
  const h = paragraphHeight(doc, runs, box.width - 16, { size: FONT_SIZE.caution }) + 12;
  ensureSpace(doc, h + 6);
  const y = doc.y;
  doc.lineWidth(0.75).rect(box.x, y, box.width, h).fillAndStroke(COLOR.cautionFill, COLOR.cautionBorder);
  doc.y = y + 6;
  writeParagraph(doc, fonts, runs, { x: box.x + 8, width: box.width - 16 }, { size: FONT_SIZE.caution });
  doc.y = y + h + SPACING.blockGapPt;
  doc.x = box.x;
}

function sectionTitle(ctx: Ctx, text: string, box: Box, keep: number): void {
  const { doc } = ctx;
  doc.y += SPACING.headingBeforePt;
  ensureSpace(doc, FONT_SIZE.h3 * 1.5 + keep);
  outline(ctx, text);
  writeParagraph(doc, ctx.fonts, [{ text, bold: true }], box, { size: FONT_SIZE.h3 });
  doc.y += SPACING.headingAfterPt;
}

function quantityLabel(q: string): string {
  return FIGURE_QUANTITY_LABELS[q as FigureQuantity] ?? q;
}

function figureList(ctx: Ctx): void {
  if (ctx.shown.length === 0) return;
  const { doc } = ctx;
  const box = fullBox(doc);
  sectionTitle(ctx, 'Figures in this bulletin and the runs they come from', box, 40);
  const rows = ctx.shown.map(({ n, figure, attrs }) => {
    const prov = figure?.provenance ?? null;
    const approach = figure?.approach ? ` at ${figure.approach.body}` : '';
    const source = [
      `run ${String(figure?.runId ?? attrs.runId)}`,
      prov?.solutionVersion !== undefined ? `solution version ${prov.solutionVersion}` : null,
      prov?.inputSha256 ? `input ${prov.inputSha256.slice(0, 12)}…` : null,
      figure?.method ? `method ${String(figure.method)}` : null,
    ]
      .filter(Boolean)
      .join(', ');
    return [
      [{ text: `[${n}]` }],
      [{ text: quantityLabel(String(figure?.quantity ?? attrs.quantity)) + approach }],
      [{ text: figure?.text ?? 'no frozen value', bold: true }],
      [{ text: source, color: COLOR.muted }],
    ] as Run[][];
  });
  drawTable(doc, ctx.fonts, { shares: [0.35, 1.4, 2.65, 2.15], header: [[{ text: '#' }], [{ text: 'Quantity' }], [{ text: 'Value' }], [{ text: 'Source' }]], rows }, box);
}

function signOff(ctx: Ctx): void {
  const { doc, version: v, fonts } = ctx;
  const box = fullBox(doc);
  sectionTitle(ctx, 'Review and sign-off', box, 60);
  paragraph(
    ctx,
    [
      { text: 'Approved by ' },
      { text: v.signOff.reviewer.name, bold: true },
      { text: ` on ${utcText(v.signOff.approvedAt)}; drafted by ${authorName(v)}. The reviewer is not the author (four-eyes rule).` },
    ],
    box,
    FONT_SIZE.signOff,
  );
  if (v.signOff.confirmedFigures.length > 0) {
    paragraph(ctx, [{ text: 'Figures the reviewer confirmed:', bold: true }], box, FONT_SIZE.signOff, 2);
    const inner: Box = { x: box.x + SPACING.listIndentPt, width: box.width - SPACING.listIndentPt };
    for (const c of v.signOff.confirmedFigures) {
      const snap = v.figures.find((f) => f.index === c.index);
      const f = snap?.value ?? null;
      doc.font(primaryFont('regular')).fontSize(FONT_SIZE.signOff);
      ensureSpace(doc, 2 * doc.currentLineHeight(true));
      const y = doc.y;
      doc.fillColor(COLOR.text).text('•', box.x + 4, y, { lineBreak: false });
      doc.y = y;
      const approach = f?.approach ? ` (${f.approach.body})` : '';
      writeParagraph(doc, fonts, [{ text: `[${c.index + 1}] ${quantityLabel(c.quantity)}${approach}: ` }, { text: f ? f.text : 'no frozen value', bold: true }, { text: `, run ${c.runId}`, color: COLOR.muted }], inner, {
        size: FONT_SIZE.signOff,
      });
      doc.y += 2;
    }
    doc.y += 4;
  }
  if (v.staleReason && v.staleReason.trim() !== '') {
    paragraph(
      ctx,
      [{ text: 'Submitted with out-of-date figures. ', bold: true, color: COLOR.accent }, { text: 'The author’s reason: ', bold: true }, { text: v.staleReason, italic: true }],
      box,
      FONT_SIZE.signOff,
    );
  }
  paragraph(
    ctx,
    [{ text: 'Reviewer’s comment: ', bold: true }, { text: v.signOff.comment && v.signOff.comment.trim() !== '' ? v.signOff.comment : '(none)', italic: true }],
    box,
    FONT_SIZE.signOff,
  );
}

function footers(ctx: Ctx): void {
  const { doc, version: v, fonts } = ctx;
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0; // writing inside the bottom margin must not open a new page
    const box = fullBox(doc);
    const y = doc.page.height - PAGE.footerFromBottomPt;
    doc.lineWidth(0.5).strokeColor(COLOR.rule).moveTo(box.x, y - 5).lineTo(box.x + box.width, y - 5).stroke();
    doc.y = y;
    // One line only: a marking too long for it is left to the title block.
    let left: Run[] = [{ text: `Bulletin ${v.number} v${v.version}   ·   ${v.distributionMarking}` }];
    if (paragraphHeight(doc, left, box.width * 0.75, { size: FONT_SIZE.footer }) > FONT_SIZE.footer * 2) left = [{ text: `Bulletin ${v.number} v${v.version}` }];
    writeParagraph(doc, fonts, left, { x: box.x, width: box.width * 0.75 }, {
      size: FONT_SIZE.footer,
      color: COLOR.muted,
    });
    doc.y = y;
    writeParagraph(doc, fonts, [{ text: `page ${i - range.start + 1} of ${range.count}`, bold: true }], { x: box.x + box.width * 0.75, width: box.width * 0.25 }, {
      size: FONT_SIZE.footer,
      align: 'right',
      color: COLOR.muted,
    });
    doc.y = y + FONT_SIZE.footer * 1.5;
    writeParagraph(doc, fonts, [{ text: `Version SHA-256 ${v.sha256}` }], box, { size: FONT_SIZE.footer, color: COLOR.muted });
    // The standing caution on every page, not only in the box on the first.
    doc.y = y + FONT_SIZE.footer * 3;
    writeParagraph(doc, fonts, [{ text: STANDING_CAUTION, italic: true }], box, { size: FONT_SIZE.footerCaution, color: COLOR.muted });
    doc.page.margins.bottom = bottom;
  }
}

// ---------------------------------------------------------------------------------------------------------------

export async function renderBulletinPdfImpl(v: BulletinVersionForPdf): Promise<Buffer> {
  if (!/^[0-9a-f]{64}$/i.test(v.sha256)) throw new Error('renderBulletinPdf: sha256 must be 64 hex digits');
  const approved = new Date(v.signOff.approvedAt);
  if (Number.isNaN(approved.getTime())) throw new Error('renderBulletinPdf: signOff.approvedAt is not a date');
  const doc = new PDFDocument({
    size: PAGE.size,
    margins: { top: PAGE.marginTopPt, left: PAGE.marginSidePt, right: PAGE.marginSidePt, bottom: PAGE.marginBottomPt },
    bufferPages: true,
    lang: 'en',
    displayTitle: true,
    autoFirstPage: true,
    compress: true,
    info: {
      Title: `${v.title} (bulletin ${v.number} v${v.version})`,
      Author: v.officeName,
      Subject: `Bulletin on ${v.objectDesignation}`,
      Keywords: `sha256:${v.sha256}`,
      Creator: PRODUCER,
      Producer: PRODUCER,
      CreationDate: approved,
      ModDate: approved,
    },
  });
  // Trailer /ID: pinned to the version hash (pdfkit 0.20 would derive it from the info dictionary, which is already
  // fixed; pinning makes the ID independent of pdfkit's hashing as well).
  (doc as unknown as { _id: Buffer })._id = Buffer.from(v.sha256.slice(0, 32), 'hex');

  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  measureLinesWhole(doc);
  const fonts = new FontSet(doc);
  const ctx: Ctx = { doc, fonts, version: v, figureIndex: 0, shown: [] };
  doc.x = doc.page.margins.left;
  doc.y = doc.page.margins.top;
  // Layout is synchronous CPU work (a plot with Monte Carlo points takes a while): give the event loop a turn between
  // top-level blocks so one bulletin does not hold up every other request. The output does not depend on timing.
  const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));
  titleBlock(ctx);
  caution(ctx);
  for (const node of v.document.content ?? []) {
    block(ctx, node, fullBox(doc));
    await yieldToLoop();
  }
  figureList(ctx);
  signOff(ctx);
  footers(ctx);
  doc.end();
  return done;
}
