// Release documents: the bulletin document schema (same TipTap editor) with two public rules: risk tables and plots
// are not allowed (the public page shows words and the copied figures only), and every linked figure must be one of
// the figures copied from the bulletin version (so no figure of a later or other run can slip in). Rendering to
// escaped HTML and to plain text, with linked figures shown as their frozen values.
import { documentText, type BulletinDocument, type DocNode, type LinkedFigureAttrs } from '../../../shared/bulletins/document';
import type { FigureSnapshot } from '../../../shared/schemas/bulletins';
import type { PlainLanguage } from '../../../shared/schemas/releases';
import { PLAIN_LABELS } from '../../../shared/releases/plainLanguage';

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

function sameFigure(a: LinkedFigureAttrs, b: LinkedFigureAttrs): boolean {
  return a.runId === b.runId && a.quantity === b.quantity && (a.body ?? null) === (b.body ?? null) && (a.epochTdbJd ?? null) === (b.epochTdbJd ?? null);
}

/** The copied figure a linked-figure node stands for, or undefined. */
export function matchSnapshot(figures: readonly FigureSnapshot[], attrs: Record<string, unknown> | undefined): FigureSnapshot | undefined {
  const a = attrs as LinkedFigureAttrs | undefined;
  if (!a) return undefined;
  return figures.find((f) => sameFigure(f.attrs, { runId: a.runId, quantity: a.quantity, body: a.body ?? null, epochTdbJd: a.epochTdbJd ?? null }));
}

/** Problems of a release document (empty when it is fine). */
export function releaseDocumentProblems(doc: BulletinDocument, figures: readonly FigureSnapshot[]): string[] {
  const problems: string[] = [];
  let n = 0;
  const walk = (node: DocNode) => {
    if (node.type === 'riskTable' || node.type === 'plot') problems.push('Risk tables and plots are not part of a public release; state the figures in words');
    if (node.type === 'linkedFigure') {
      n++;
      if (!matchSnapshot(figures, node.attrs)) problems.push(`Figure ${n} is not one of the figures copied from the bulletin version`);
    }
    for (const c of node.content ?? []) walk(c);
  };
  for (const c of doc.content ?? []) walk(c);
  return [...new Set(problems)];
}

const text = (t: string): DocNode => ({ type: 'text', text: t });
const p = (...content: DocNode[]): DocNode => ({ type: 'paragraph', content });

/** The starting document of a new release: each figure with its plain statement, and the uncertainty sentence. */
export function initialReleaseDocument(designation: string, figures: readonly FigureSnapshot[], plain: PlainLanguage): BulletinDocument {
  const content: DocNode[] = [p(text(`The office has assessed the orbit of the object ${designation}. What is known today:`))];
  const items: DocNode[] = [];
  for (const s of plain.statements) {
    const f = figures.find((x) => x.index === s.figureIndex);
    if (!f) continue;
    items.push({ type: 'listItem', content: [p(text(`${s.label}: ${s.text} (`), { type: 'linkedFigure', attrs: { ...f.attrs } }, text(').'))] });
  }
  if (items.length) content.push({ type: 'bulletList', content: items });
  // The uncertainty sentence and the caution are shown with every release (not part of the editable text).
  return { type: 'doc', content };
}

const MARK_TAGS: Record<string, string> = { bold: 'strong', italic: 'em', strike: 's', code: 'code', underline: 'u', subscript: 'sub', superscript: 'sup' };

/** Escaped HTML of a release document (headings start at h2: the page's h1 is the title). */
export function releaseDocumentHtml(doc: BulletinDocument, figures: readonly FigureSnapshot[]): string {
  const render = (n: DocNode): string => {
    const inner = () => (n.content ?? []).map(render).join('');
    switch (n.type) {
      case 'text': {
        let out = escapeHtml(n.text ?? '');
        for (const m of n.marks ?? []) {
          if (m.type === 'link') {
            const href = typeof m.attrs?.href === 'string' && /^(https?:|mailto:)/i.test(m.attrs.href) ? m.attrs.href : null;
            if (href) out = `<a href="${escapeHtml(href)}" rel="noopener noreferrer">${out}</a>`;
          } else if (MARK_TAGS[m.type]) out = `<${MARK_TAGS[m.type]}>${out}</${MARK_TAGS[m.type]}>`;
        }
        return out;
      }
      case 'paragraph':
        return `<p>${inner()}</p>\n`;
      case 'heading': {
        const level = Math.min(6, Math.max(2, Number(n.attrs?.level ?? 2) + 1));
        return `<h${level}>${inner()}</h${level}>\n`;
      }
      case 'blockquote':
        return `<blockquote>${inner()}</blockquote>\n`;
      case 'bulletList':
        return `<ul>${inner()}</ul>\n`;
      case 'orderedList':
        return `<ol>${inner()}</ol>\n`;
      case 'listItem':
        return `<li>${inner()}</li>`;
      case 'codeBlock':
        return `<pre>${inner()}</pre>\n`;
      case 'hardBreak':
        return '<br>';
      case 'horizontalRule':
        return '<hr>\n';
      case 'table':
        return `<table>${inner()}</table>\n`;
      case 'tableRow':
        return `<tr>${inner()}</tr>`;
      case 'tableHeader':
        return `<th scope="col">${inner()}</th>`;
      case 'tableCell':
        return `<td>${inner()}</td>`;
      case 'image': {
        const src = typeof n.attrs?.src === 'string' && /^data:image\/(png|jpeg|gif|webp);base64,/i.test(n.attrs.src) ? n.attrs.src : null;
        const alt = typeof n.attrs?.alt === 'string' ? n.attrs.alt : '';
        return src ? `<figure><img src="${escapeHtml(src)}" alt="${escapeHtml(alt)}"></figure>\n` : alt ? `<p>[${escapeHtml(alt)}]</p>\n` : '';
      }
      case 'linkedFigure': {
        const f = matchSnapshot(figures, n.attrs);
        if (!f) return '';
        const label = PLAIN_LABELS[f.value.quantity] ?? f.value.quantity;
        return `<span class="figure" title="${escapeHtml(label)}">${escapeHtml(f.value.text)}</span>`;
      }
      case 'riskTable':
      case 'plot':
        return '';
      default:
        return inner();
    }
  };
  return (doc.content ?? []).map(render).join('');
}

/** Plain text of a release document, one block per line, linked figures as their frozen values. */
export function releaseDocumentText(doc: BulletinDocument, figures: readonly FigureSnapshot[]): string {
  return documentText(doc, (_i, attrs) => matchSnapshot(figures, attrs as unknown as Record<string, unknown>)?.value.text ?? '');
}
