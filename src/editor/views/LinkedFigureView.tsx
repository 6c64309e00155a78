// The linked figure as it shows in the text: the formatted value (units, uncertainty) from its run; on hover or
// keyboard focus, the run, solution version and method behind it. A figure bound to an older run than the object's
// newest is marked out of date, with the newer value beside it and one action to rebind (drafts only).
import { NodeViewWrapper, type ReactNodeViewProps } from '@tiptap/react';
import { useId } from 'react';
import { FIGURE_QUANTITY_LABELS, type FigureValue } from '../../../shared/bulletins/document';
import { figureAttrs, useFigureSource } from '../FigureSource';

export function approachLabel(v: FigureValue): string | null {
  if (!v.approach) return null;
  return `${v.approach.body} approach, JD ${v.approach.epochTdbJd.toFixed(2)} TDB`;
}

export function FigureProvenance({ value }: { value: FigureValue }) {
  const p = value.provenance;
  return (
    <>
      <span className="block font-semibold">{FIGURE_QUANTITY_LABELS[value.quantity]}</span>
      <span className="block">
        Run #{p.runId} · solution v{p.solutionVersion}
        {value.method ? ` · ${value.method}` : ''}
      </span>
      {approachLabel(value) && <span className="block">{approachLabel(value)}</span>}
      {p.engineVersion && <span className="block text-white/70">engine {p.engineVersion}</span>}
    </>
  );
}

export function LinkedFigureView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const attrs = figureAttrs(node.attrs);
  const source = useFigureSource();
  const lookup = source.useFigure(attrs);
  const tipId = useId();
  const label = attrs.quantity ? FIGURE_QUANTITY_LABELS[attrs.quantity] : 'Figure';

  const ring = selected ? ' ring-2 ring-accent-600' : '';
  if (lookup.state === 'loading') {
    return (
      <NodeViewWrapper as="span" contentEditable={false} className={`tocsin-figure rounded bg-accent-50 px-1 text-ink-soft${ring}`} data-figure-state="loading">
        {label}…
      </NodeViewWrapper>
    );
  }
  if (lookup.state === 'missing') {
    return (
      <NodeViewWrapper
        as="span"
        contentEditable={false}
        className={`tocsin-figure rounded border border-danger-200 bg-danger-50 px-1 text-danger-700${ring}`}
        data-figure-state="missing"
        title={lookup.message}
      >
        {label} of run #{attrs.runId}: unavailable
      </NodeViewWrapper>
    );
  }
  const { value, newer } = lookup;
  const stale = newer !== null;
  return (
    <NodeViewWrapper
      as="span"
      contentEditable={false}
      className="tocsin-figure group relative inline"
      data-figure-state={stale ? 'stale' : 'current'}
      data-testid="linked-figure"
    >
      <span
        tabIndex={0}
        aria-describedby={tipId}
        className={
          'rounded px-1 py-0.5 whitespace-nowrap tabular-nums outline-offset-1 ' +
          (stale ? 'bg-signal-50 text-signal-700 line-through decoration-signal-700/60' : 'bg-accent-50 text-accent-800 underline decoration-dotted decoration-accent-600 underline-offset-4') +
          ring
        }
      >
        {value.text}
      </span>
      {stale && (
        <span className="ml-1 inline-flex items-baseline gap-1 rounded border border-signal-200 bg-white px-1 py-0.5 font-sans text-xs text-signal-700" data-testid="stale-figure">
          <span className="font-semibold">out of date</span>
          {newer.value ? (
            <>
              <span>· run #{newer.runId}:</span>
              <span className="font-serif text-sm text-ink tabular-nums">{newer.value.text}</span>
            </>
          ) : (
            <span>· run #{newer.runId} has no matching approach</span>
          )}
          {source.editable && newer.value && (
            <button
              type="button"
              className="ml-1 rounded border border-signal-200 px-1.5 font-medium text-accent-700 hover:bg-accent-50"
              onClick={() =>
                updateAttributes({
                  runId: newer.runId,
                  body: newer.value?.approach?.body ?? attrs.body,
                  epochTdbJd: newer.value?.approach?.epochTdbJd ?? attrs.epochTdbJd,
                })
              }
            >
              Rebind to run #{newer.runId}
            </button>
          )}
        </span>
      )}
      <span
        id={tipId}
        role="tooltip"
        className="pointer-events-none invisible absolute bottom-full left-0 z-20 mb-1 w-max max-w-72 rounded-md bg-ink px-3 py-2 font-sans text-xs leading-snug text-white opacity-0 shadow-lg transition-opacity group-hover:visible group-hover:opacity-100 group-focus-within:visible group-focus-within:opacity-100"
      >
        <FigureProvenance value={value} />
      </span>
    </NodeViewWrapper>
  );
}
