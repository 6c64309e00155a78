/**
 * Bulletin PDF layout (issue 6 item 5): page geometry, type sizes, colours and the standing texts.
 * Read by server/services/pdf/render.ts; change the look here, not in the renderer.
 * Units: PDF points (1/72 inch). A4 is 595.28 x 841.89 pt.
 */

/** The standing caution printed on every bulletin (Tocsin policy). */
export const STANDING_CAUTION =
  "Tocsin's numbers are analysis aids; official impact-risk statements come from the responsible national and international authorities.";

export const PAGE = {
  size: 'A4' as const,
  marginTopPt: 56,
  marginSidePt: 56,
  /** Room kept free at the bottom for the footer (the footer sits inside it). */
  marginBottomPt: 72,
  /** Top of the footer text (three lines: marking and page, version hash, standing caution), up from the page bottom. */
  footerFromBottomPt: 48,
};

export const FONT_SIZE = {
  office: 9,
  title: 18,
  subtitle: 11,
  meta: 9,
  marking: 9,
  body: 10,
  h1: 15,
  h2: 13,
  h3: 11.5,
  table: 8.5,
  tableHeader: 8.5,
  figureRun: 7,
  caution: 9,
  signOff: 9.5,
  footer: 7,
  footerCaution: 6.5,
  plotCaption: 8.5,
};

export const COLOR = {
  text: '#1a1a1a',
  muted: '#5b5f66',
  rule: '#9aa0a6',
  accent: '#7a1f1f',
  link: '#1f4e8c',
  markingBorder: '#7a1f1f',
  cautionFill: '#f4efe6',
  cautionBorder: '#b59a62',
  tableHeaderFill: '#e9ecef',
  tableBorder: '#b8bec5',
  stripeFill: '#f7f8f9',
  figureFill: '#eef3f9',
};

export const SPACING = {
  paragraphAfterPt: 6,
  headingBeforePt: 10,
  headingAfterPt: 4,
  listIndentPt: 16,
  listItemAfterPt: 2,
  blockGapPt: 10,
  tableCellPadPt: 3.5,
  lineGapPt: 1.5,
};

/**
 * Plots: width as a share of the text width, the height/width ratio of the drawing, and the width in SVG pixels the
 * shared renderers lay the plot out at before it is scaled into the page (wider than their default 640 px: the SVG asks for Helvetica, Merriweather is wider, and the legends must fit).
 */
export const PLOT = {
  widthShare: 1,
  aspect: 0.6,
  svgWidthPx: 760,
  /** Most Monte Carlo b-plane points drawn (hits always kept; the legend says how many of how many). */
  maxMonteCarloPoints: 2000,
};

export const PRODUCER = 'Tocsin bulletin renderer';
