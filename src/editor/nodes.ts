// Tocsin's own TipTap nodes. Their attributes follow shared/bulletins/document.ts (the schema the server
// validates); the node views (React) are in ./views and read figure values from the FigureSource context.
import { mergeAttributes, Node } from '@tiptap/core';
import { ReactNodeViewRenderer } from '@tiptap/react';
import { LinkedFigureView } from './views/LinkedFigureView';
import { PlotView } from './views/PlotView';
import { RiskTableView } from './views/RiskTableView';

const numberAttr = (name: string) => ({
  default: null,
  parseHTML: (el: HTMLElement) => {
    const v = el.getAttribute(`data-${name}`);
    return v === null || v === '' ? null : Number(v);
  },
  renderHTML: (attrs: Record<string, unknown>) => (attrs[name] === null || attrs[name] === undefined ? {} : { [`data-${name}`]: String(attrs[name]) }),
});

const stringAttr = (name: string) => ({
  default: null,
  parseHTML: (el: HTMLElement) => el.getAttribute(`data-${name}`),
  renderHTML: (attrs: Record<string, unknown>) => (attrs[name] === null || attrs[name] === undefined ? {} : { [`data-${name}`]: String(attrs[name]) }),
});

declare module '@tiptap/core' {
  interface Commands<ReturnType> {
    tocsinFigures: {
      insertLinkedFigure: (attrs: { runId: number; quantity: string; body: string | null; epochTdbJd: number | null }) => ReturnType;
      insertRiskTable: (attrs: { runId: number }) => ReturnType;
      insertPlot: (attrs: { runId: number; kind: 'bplane' | 'distance'; body: string; epochTdbJd: number }) => ReturnType;
    };
  }
}

/** An inline atom standing for one number of one run: `{runId, quantity, body, epochTdbJd}`. */
export const LinkedFigure = Node.create({
  name: 'linkedFigure',
  group: 'inline',
  inline: true,
  atom: true,
  selectable: true,
  draggable: false,
  addAttributes() {
    return {
      runId: numberAttr('run-id'),
      quantity: stringAttr('quantity'),
      body: stringAttr('body'),
      epochTdbJd: numberAttr('epoch-tdb-jd'),
    };
  },
  parseHTML() {
    return [{ tag: 'span[data-linked-figure]' }];
  },
  renderHTML({ HTMLAttributes }) {
    return ['span', mergeAttributes({ 'data-linked-figure': '' }, HTMLAttributes)];
  },
  addNodeView() {
    return ReactNodeViewRenderer(LinkedFigureView, { as: 'span', className: 'tocsin-figure-host' });
  },
  addCommands() {
    return {
      insertLinkedFigure:
        (attrs) =>
        ({ commands }) =>
          commands.insertContent([{ type: this.name, attrs }, { type: 'text', text: ' ' }]),
    };
  },
});

/** A block atom embedding a run's encounter table. */
export const RiskTable = Node.create({
  name: 'riskTable',
  group: 'block',
  atom: true,
  selectable: true,
  draggable: true,
  addAttributes() {
    return { runId: numberAttr('run-id') };
  },
  parseHTML() {
    return [{ tag: 'div[data-risk-table]' }];
  },
  renderHTML({ HTMLAttributes }) {
    return ['div', mergeAttributes({ 'data-risk-table': '' }, HTMLAttributes)];
  },
  addNodeView() {
    return ReactNodeViewRenderer(RiskTableView);
  },
  addCommands() {
    return {
      insertRiskTable:
        (attrs) =>
        ({ commands }) =>
          commands.insertContent({ type: this.name, attrs }),
    };
  },
});

/** A block atom embedding a run's b-plane or distance plot around one approach. */
export const Plot = Node.create({
  name: 'plot',
  group: 'block',
  atom: true,
  selectable: true,
  draggable: true,
  addAttributes() {
    return { runId: numberAttr('run-id'), kind: stringAttr('kind'), body: stringAttr('body'), epochTdbJd: numberAttr('epoch-tdb-jd') };
  },
  parseHTML() {
    return [{ tag: 'div[data-plot]' }];
  },
  renderHTML({ HTMLAttributes }) {
    return ['div', mergeAttributes({ 'data-plot': '' }, HTMLAttributes)];
  },
  addNodeView() {
    return ReactNodeViewRenderer(PlotView);
  },
  addCommands() {
    return {
      insertPlot:
        (attrs) =>
        ({ commands }) =>
          commands.insertContent({ type: this.name, attrs }),
    };
  },
});
