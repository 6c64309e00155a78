/**
 * Rich inline text for the bulletin PDF: runs with bold/italic/link/colour, split by glyph coverage (fonts.ts) and
 * written as one pdfkit "continued" paragraph so line wrapping flows across font switches.
 */
import { COLOR, FONT_SIZE, SPACING } from '../../../templates/pdf/layout';
import { FontSet, primaryFont, styleOf } from './fonts';

export type Run = {
  text: string;
  bold?: boolean;
  italic?: boolean;
  link?: string | null;
  underline?: boolean;
  strike?: boolean;
  color?: string;
  size?: number;
  /** Smaller text raised to the top of the line (reference marks), instead of sitting on the baseline. */
  raise?: boolean;
};

export type Box = { x: number; width: number };

export type ParagraphOptions = {
  size?: number;
  align?: 'left' | 'right' | 'center' | 'justify';
  color?: string;
  lineGap?: number;
  /** Indentation of the first line. */
  indent?: number;
};

type LineFn = (text: string, options: { textWidth?: number; align?: string; wordSpacing?: number; features?: unknown }, wrapper?: unknown) => void;

/**
 * pdfkit 0.20's line wrapper measures a line as the sum of its words' widths, each word measured alone, so kerning
 * across word and break boundaries is lost: "(100–140 m)" (a break after the en dash, and Merriweather kerns the
 * dash with digits by several points) is measured wider than it is drawn, and the next "continued" piece starts
 * after a visible gap. Re-measure each emitted line as a whole before pdfkit uses the width (continued position,
 * right/centre alignment, underline length). Justified lines keep pdfkit's own measure (their word spacing is
 * derived from it).
 */
export function measureLinesWhole(doc: PDFKit.PDFDocument): void {
  const d = doc as unknown as { _line: LineFn; widthOfString(s: string, o?: unknown): number };
  const original = d._line;
  // pdfkit calls the line callback both bound and unbound: use the document itself, not `this`.
  d._line = function (text, options = {}, wrapper) {
    if (wrapper && options.align !== 'justify' && typeof options.textWidth === 'number') {
      options.textWidth = d.widthOfString(String(text).replace(/\n/g, ''), options);
    }
    return original.call(d, text, options, wrapper);
  };
}

/** Split runs at line breaks ("\n"): pdfkit's continued text mis-places pieces after a newline. */
export function splitLines(runs: Run[]): Run[][] {
  const lines: Run[][] = [[]];
  for (const r of runs) {
    r.text.split('\n').forEach((part, i) => {
      if (i > 0) lines.push([]);
      if (part !== '') lines[lines.length - 1].push({ ...r, text: part });
    });
  }
  return lines;
}

/** Write runs as one paragraph at (box.x, doc.y) wrapped to box.width; doc.y ends below the paragraph. */
export function writeParagraph(doc: PDFKit.PDFDocument, fonts: FontSet, runs: Run[], box: Box, opts: ParagraphOptions = {}): void {
  const lines = splitLines(runs);
  if (lines.length > 1) {
    lines.forEach((line, i) => writeLine(doc, fonts, line, box, i === 0 ? opts : { ...opts, indent: 0 }));
    return;
  }
  writeLine(doc, fonts, runs, box, opts);
}

function writeLine(doc: PDFKit.PDFDocument, fonts: FontSet, runs: Run[], box: Box, opts: ParagraphOptions): void {
  const size = opts.size ?? FONT_SIZE.body;
  const pieces: { font: string; text: string; run: Run }[] = [];
  for (const run of runs) {
    if (run.text === '') continue;
    for (const p of fonts.split(styleOf(!!run.bold, !!run.italic), run.text)) pieces.push({ ...p, run });
  }
  if (pieces.length === 0) {
    // An empty paragraph still takes one line.
    doc.font(primaryFont('regular')).fontSize(size);
    doc.y += doc.currentLineHeight(true) + (opts.lineGap ?? SPACING.lineGapPt);
    return;
  }
  const y = doc.y;
  // Every piece sits on the baseline of the paragraph's primary font: pdfkit would otherwise place each fragment by
  // its own font's ascender, and fallback fonts with tall ascenders (Noto Sans Math) would drop below the line.
  const primaryAscender = fonts.ascender(primaryFont('regular'));
  pieces.forEach((p, i) => {
    const last = i === pieces.length - 1;
    const pieceSize = p.run.size ?? size;
    doc
      .font(p.font)
      .fontSize(pieceSize * fonts.scale(p.font))
      .fillColor(p.run.color ?? (p.run.link ? COLOR.link : (opts.color ?? COLOR.text)));
    const o: PDFKit.Mixins.TextOptions = {
      continued: !last,
      link: p.run.link ?? null,
      underline: !!p.run.underline || !!p.run.link,
      strike: !!p.run.strike,
      baseline: -((primaryAscender / 1000) * (p.run.raise ? pieceSize : Math.max(pieceSize, size))),
    } as PDFKit.Mixins.TextOptions;
    if (i === 0) {
      Object.assign(o, { width: box.width, align: opts.align ?? 'left', lineGap: opts.lineGap ?? SPACING.lineGapPt, indent: opts.indent ?? 0 });
      doc.text(p.text, box.x, y, o);
    } else {
      doc.text(p.text, o);
    }
  });
  doc.fillColor(COLOR.text);
}

/** Plain text of runs (for measuring). */
export function runsText(runs: Run[]): string {
  return runs.map((r) => r.text).join('');
}

/** Height a paragraph of runs will take in a box (measured in the primary font of its dominant style). */
export function paragraphHeight(doc: PDFKit.PDFDocument, runs: Run[], width: number, opts: ParagraphOptions = {}): number {
  const lines = splitLines(runs);
  if (lines.length > 1) return lines.reduce((h, line) => h + lineHeight(doc, line, width, opts), 0);
  return lineHeight(doc, runs, width, opts);
}

/** Share of the width a measurement assumes, so runs set partly in (wider) fallback fonts still fit the height. */
const MEASURE_WIDTH_SHARE = 0.96;

function lineHeight(doc: PDFKit.PDFDocument, runs: Run[], fullWidth: number, opts: ParagraphOptions): number {
  const width = fullWidth * MEASURE_WIDTH_SHARE;
  const text = runsText(runs);
  const boldShare = runs.filter((r) => r.bold).reduce((a, r) => a + r.text.length, 0) / Math.max(1, text.length);
  doc.font(primaryFont(boldShare > 0.5 ? 'bold' : 'regular')).fontSize(opts.size ?? FONT_SIZE.body);
  if (text === '') return doc.currentLineHeight(true) + (opts.lineGap ?? SPACING.lineGapPt);
  return doc.heightOfString(text, { width, lineGap: opts.lineGap ?? SPACING.lineGapPt });
}
