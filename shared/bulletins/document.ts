// The bulletin document: TipTap/ProseMirror JSON ({type:'doc', content:[...]}) with the starter-kit nodes and
// marks, tables, links, images, and Tocsin's own nodes:
//   linkedFigure (inline atom)  attrs { runId, quantity, body, epochTdbJd }
//   riskTable    (block atom)   attrs { runId }
//   plot         (block atom)   attrs { runId, kind: 'bplane' | 'distance', body, epochTdbJd }
// A linked figure names its approach by body and encounter epoch (TDB Julian date) rather than by an index, so it
// can be rebound to a newer run: the approach of the same body nearest in time within FIGURE_MATCH_DAYS is taken.
// Object-level quantities (diameter, palermoCumulative, torinoMax) have body and epoch null.
// Used by the server (validation, figure extraction, text for version differences) and by the client (editor).
import { z } from 'zod';

export const FIGURE_QUANTITIES = [
  'impactProbability',
  'palermo',
  'torino',
  'missDistance',
  'encounterDate',
  'vInfinity',
  'diameter',
  'energy',
  'palermoCumulative',
  'torinoMax',
] as const;
export const figureQuantitySchema = z.enum(FIGURE_QUANTITIES);
export type FigureQuantity = z.infer<typeof figureQuantitySchema>;

export const FIGURE_QUANTITY_LABELS: Record<FigureQuantity, string> = {
  impactProbability: 'Impact probability',
  palermo: 'Palermo scale',
  torino: 'Torino scale',
  missDistance: 'Miss distance',
  encounterDate: 'Encounter date',
  vInfinity: 'V-infinity',
  diameter: 'Diameter',
  energy: 'Impact energy',
  palermoCumulative: 'Cumulative Palermo scale',
  torinoMax: 'Highest Torino scale',
};

/** Quantities that belong to the object (or the whole run), not to one approach. */
export const OBJECT_LEVEL_QUANTITIES: readonly FigureQuantity[] = ['diameter', 'palermoCumulative', 'torinoMax'];

/** Risk figures: the ones a reviewer must confirm one by one at approval (every linked figure is confirmed; see workflow.ts). */
export const RISK_QUANTITIES: readonly FigureQuantity[] = ['impactProbability', 'palermo', 'torino', 'palermoCumulative', 'torinoMax', 'energy'];

/** Window for matching an approach of another run to a figure's (body, epoch), days (same as the engine's MC match). */
export const FIGURE_MATCH_DAYS = 30;

export const linkedFigureAttrsSchema = z.object({
  runId: z.number().int().positive(),
  quantity: figureQuantitySchema,
  body: z.string().min(1).nullable().default(null),
  epochTdbJd: z.number().finite().nullable().default(null),
});
export type LinkedFigureAttrs = z.infer<typeof linkedFigureAttrsSchema>;

export const riskTableAttrsSchema = z.object({ runId: z.number().int().positive() });
export type RiskTableAttrs = z.infer<typeof riskTableAttrsSchema>;

export const PLOT_KINDS = ['bplane', 'distance'] as const;
export const plotAttrsSchema = z.object({
  runId: z.number().int().positive(),
  kind: z.enum(PLOT_KINDS),
  body: z.string().min(1),
  epochTdbJd: z.number().finite(),
});
export type PlotAttrs = z.infer<typeof plotAttrsSchema>;

/** Node types the editor may produce (starter kit, tables, image, Tocsin's nodes). */
export const NODE_TYPES = [
  'doc',
  'paragraph',
  'text',
  'heading',
  'blockquote',
  'bulletList',
  'orderedList',
  'listItem',
  'codeBlock',
  'hardBreak',
  'horizontalRule',
  'table',
  'tableRow',
  'tableHeader',
  'tableCell',
  'image',
  'linkedFigure',
  'riskTable',
  'plot',
] as const;
export type NodeType = (typeof NODE_TYPES)[number];

export const MARK_TYPES = ['bold', 'italic', 'strike', 'code', 'underline', 'link', 'subscript', 'superscript'] as const;

export const markSchema = z.object({
  type: z.enum(MARK_TYPES),
  attrs: z.record(z.string(), z.unknown()).optional(),
});
export type DocMark = z.infer<typeof markSchema>;

export interface DocNode {
  type: NodeType;
  attrs?: Record<string, unknown>;
  content?: DocNode[];
  marks?: DocMark[];
  text?: string;
}

const MAX_DEPTH = 40;

export const docNodeSchema: z.ZodType<DocNode> = z.lazy(() =>
  z.object({
    type: z.enum(NODE_TYPES),
    attrs: z.record(z.string(), z.unknown()).optional(),
    content: z.array(docNodeSchema).optional(),
    marks: z.array(markSchema).optional(),
    text: z.string().optional(),
  }),
) as z.ZodType<DocNode>;

const CUSTOM_ATTRS: Partial<Record<NodeType, z.ZodType>> = {
  linkedFigure: linkedFigureAttrsSchema,
  riskTable: riskTableAttrsSchema,
  plot: plotAttrsSchema,
};

/** The whole document: a `doc` root; Tocsin's nodes must carry valid attrs; links only http(s)/mailto. */
export const bulletinDocumentSchema = z
  .object({ type: z.literal('doc'), content: z.array(docNodeSchema).default([]) })
  .superRefine((doc, ctx) => {
    const walk = (node: DocNode, path: (string | number)[], depth: number) => {
      if (depth > MAX_DEPTH) {
        ctx.addIssue({ code: 'custom', path, message: `nested deeper than ${MAX_DEPTH}` });
        return;
      }
      const custom = CUSTOM_ATTRS[node.type];
      if (custom) {
        const r = custom.safeParse(node.attrs ?? {});
        if (!r.success) for (const i of r.error.issues) ctx.addIssue({ code: 'custom', path: [...path, 'attrs', ...i.path.map(String)], message: `${node.type}: ${i.message}` });
      }
      if (node.type === 'text' && typeof node.text !== 'string') ctx.addIssue({ code: 'custom', path, message: 'text node without text' });
      for (const [mi, m] of (node.marks ?? []).entries()) {
        if (m.type === 'link') {
          const href = m.attrs?.href;
          if (typeof href !== 'string' || !/^(https?:|mailto:)/i.test(href)) ctx.addIssue({ code: 'custom', path: [...path, 'marks', mi], message: 'links must be http(s) or mailto' });
        }
      }
      (node.content ?? []).forEach((child, i) => walk(child, [...path, 'content', i], depth + 1));
    };
    doc.content.forEach((n, i) => walk(n, ['content', i], 1));
  });
export type BulletinDocument = z.infer<typeof bulletinDocumentSchema>;

export const EMPTY_DOCUMENT: BulletinDocument = { type: 'doc', content: [{ type: 'paragraph' }] };

/** Visit every node depth-first in document order. */
export function visitNodes(doc: { content?: DocNode[] }, fn: (node: DocNode) => void): void {
  const walk = (n: DocNode) => {
    fn(n);
    for (const c of n.content ?? []) walk(c);
  };
  for (const n of doc.content ?? []) walk(n);
}

/**
 * The linked figures of a document in document order. `index` is the figure's position among linked figures
 * (0-based); it is how sign-offs, staleness reports and version differences refer to a figure.
 */
export function linkedFigures(doc: { content?: DocNode[] }): { index: number; attrs: LinkedFigureAttrs }[] {
  const out: { index: number; attrs: LinkedFigureAttrs }[] = [];
  visitNodes(doc, (n) => {
    if (n.type === 'linkedFigure') out.push({ index: out.length, attrs: linkedFigureAttrsSchema.parse(n.attrs ?? {}) });
  });
  return out;
}

/** Every run a document refers to (figures, risk tables, plots), ascending. */
export function referencedRunIds(doc: { content?: DocNode[] }): number[] {
  const ids = new Set<number>();
  visitNodes(doc, (n) => {
    if ((n.type === 'linkedFigure' || n.type === 'riskTable' || n.type === 'plot') && typeof n.attrs?.runId === 'number') ids.add(n.attrs.runId);
  });
  return [...ids].sort((a, b) => a - b);
}

const BLOCKS = new Set<NodeType>(['paragraph', 'heading', 'blockquote', 'codeBlock', 'listItem', 'tableRow', 'horizontalRule', 'riskTable', 'plot', 'image']);

/**
 * Plain text of a document, one line per block; a linked figure becomes `figureText(index, attrs)` (default
 * `[figure N]`), a risk table `[risk table of run R]`, a plot `[b-plane plot of run R]`. Used for readable
 * differences between versions and the plain-text e-mail summary.
 */
export function documentText(doc: { content?: DocNode[] }, figureText?: (index: number, attrs: LinkedFigureAttrs) => string): string {
  const lines: string[] = [];
  let line = '';
  let figure = 0;
  const flush = () => {
    if (line.trim() !== '') lines.push(line.trim());
    line = '';
  };
  const walk = (n: DocNode) => {
    switch (n.type) {
      case 'text':
        line += n.text ?? '';
        return;
      case 'hardBreak':
        line += ' ';
        return;
      case 'linkedFigure': {
        const attrs = linkedFigureAttrsSchema.parse(n.attrs ?? {});
        line += figureText ? figureText(figure, attrs) : `[figure ${figure + 1}]`;
        figure++;
        return;
      }
      case 'riskTable':
        flush();
        lines.push(`[risk table of run ${n.attrs?.runId}]`);
        return;
      case 'plot':
        flush();
        lines.push(`[${n.attrs?.kind === 'bplane' ? 'b-plane' : 'distance'} plot of run ${n.attrs?.runId}]`);
        return;
      case 'image':
        flush();
        lines.push(`[image${typeof n.attrs?.alt === 'string' && n.attrs.alt ? `: ${n.attrs.alt}` : ''}]`);
        return;
      case 'tableCell':
      case 'tableHeader':
        for (const c of n.content ?? []) walk(c);
        line += ' | ';
        return;
      case 'horizontalRule':
        flush();
        lines.push('---');
        return;
    }
    if (n.type === 'listItem') {
      flush();
      line = '- ';
    }
    for (const c of n.content ?? []) walk(c);
    if (BLOCKS.has(n.type)) flush();
  };
  for (const n of doc.content ?? []) walk(n);
  flush();
  return lines.join('\n');
}

/**
 * What a linked figure shows: its value from the bound run, formatted with units and uncertainty
 * (shared/bulletins/figures.ts extractFigure builds it from a run's assess JSON).
 */
export const figureValueSchema = z.object({
  quantity: figureQuantitySchema,
  runId: z.number().int(),
  /** Formatted with units and uncertainty, e.g. "1.2e-4 (95%: 8e-5–1.9e-4)". */
  text: z.string(),
  value: z.union([z.number(), z.string()]).nullable(),
  low: z.number().nullable(),
  high: z.number().nullable(),
  unit: z.string().nullable(),
  /** Which method gave the value (e.g. 'linear', 'monteCarlo', 'lov'), when it matters. */
  method: z.string().nullable(),
  approach: z.object({ body: z.string(), epochTdbJd: z.number() }).nullable(),
  provenance: z.object({
    runId: z.number().int(),
    solutionId: z.number().int(),
    solutionVersion: z.number().int(),
    inputSha256: z.string(),
    engineVersion: z.string().nullable(),
  }),
});
export type FigureValue = z.infer<typeof figureValueSchema>;
