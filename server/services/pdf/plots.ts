/**
 * Plots in the bulletin PDF: the SVG strings of shared/plots (the same renderers as the client's downloads) drawn
 * as vectors with svg-to-pdfkit. SVG text is re-set in the PDF's fonts: each text run is split by glyph coverage
 * into <tspan font-family="..."> pieces naming the registered fallback fonts, so symbols Merriweather lacks (σ, ⊕,
 * ≈ ...) do not come out as empty boxes.
 */
import SVGtoPDF from 'svg-to-pdfkit';
import { FIGURE_MATCH_DAYS } from '../../../shared/bulletins/document';
import { bPlaneSvg, distanceSvg } from '../../../shared/plots';
import { safeParseAssessment } from '../../../shared/schemas/assessment';
import { PLOT } from '../../../templates/pdf/layout';
import { primaryFont, styleOf, type FontSet } from './fonts';

export type PlotRequest = { kind: 'bplane' | 'distance'; result: unknown; body: string; epochTdbJd: number };
export type PlotBox = { x: number; y: number; width: number; height: number };

const ENTITY: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };
function decode(s: string): string {
  return s.replace(/&(#x[0-9a-f]+|#\d+|amp|lt|gt|quot|apos);/gi, (_, e: string) =>
    e[0] === '#' ? String.fromCodePoint(e[1] === 'x' || e[1] === 'X' ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10)) : ENTITY[e.toLowerCase()],
  );
}
function encode(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

/** Wrap the characters of each SVG text node that Merriweather lacks in tspans set in a fallback font. */
export function withFallbackFonts(svg: string, fonts: FontSet): string {
  return svg.replace(/<text\b[^>]*>[\s\S]*?<\/text>/g, (block) => {
    const open = /^<text\b[^>]*>/.exec(block)![0];
    const bold = /font-weight\s*[:=]\s*["']?(bold|[6-9]00)/.test(open);
    const style = styleOf(bold, false);
    return block.replace(/>([^<]+)</g, (m, raw: string) => {
      const pieces = fonts.split(style, decode(raw));
      if (pieces.every((p) => p.font === primaryFont(style))) return m;
      return `>${pieces.map((p) => (p.font === primaryFont(style) ? encode(p.text) : `<tspan font-family="${p.font}">${encode(p.text)}</tspan>`)).join('')}<`;
    });
  });
}

/** Index of the approach to `body` nearest to the epoch (within FIGURE_MATCH_DAYS), or -1. */
export function approachIndexOf(approaches: { body: string; epochTdbJd: number }[], body: string, epochTdbJd: number): number {
  let best = -1;
  let bestDt = Infinity;
  approaches.forEach((a, i) => {
    const dt = Math.abs(a.epochTdbJd - epochTdbJd);
    if (a.body === body && dt <= FIGURE_MATCH_DAYS && dt < bestDt) {
      best = i;
      bestDt = dt;
    }
  });
  return best;
}

export function drawPlot(doc: PDFKit.PDFDocument, req: PlotRequest, box: PlotBox, fonts: FontSet): { ok: true } | { ok: false; reason: string } {
  const parsed = safeParseAssessment(req.result);
  if (!parsed.ok) return { ok: false, reason: `the frozen run result could not be read (${parsed.error})` };
  const result = parsed.value;
  const i = approachIndexOf(result.approaches, req.body, req.epochTdbJd);
  if (i < 0) return { ok: false, reason: `the run has no approach to ${req.body} near the plot's epoch` };
  // The SVG is laid out at the renderers' own width (PLOT.svgWidthPx: legends and labels are sized for it) and
  // scaled into the box; the height keeps the box's proportions.
  const width = PLOT.svgWidthPx;
  const height = Math.round((width * box.height) / box.width);
  let svg: string;
  try {
    svg = req.kind === 'bplane' ? bPlaneSvg(result, i, { width, height, maxPoints: PLOT.maxMonteCarloPoints }) : distanceSvg(result, i, { width, height });
  } catch (err) {
    return { ok: false, reason: `the plot could not be drawn (${(err as Error).message})` };
  }
  const warnings: string[] = [];
  SVGtoPDF(doc, withFallbackFonts(svg, fonts), box.x, box.y, {
    width: box.width,
    height: box.height,
    preserveAspectRatio: 'xMidYMid meet',
    warningCallback: (m) => warnings.push(m),
    fontCallback: (family, bold, italic) => {
      const f = family.replace(/["']/g, '').split(',')[0].trim();
      if (/^(mw|ns|nsm)-/.test(f)) return f;
      return primaryFont(styleOf(bold, italic));
    },
  });
  return { ok: true };
}
