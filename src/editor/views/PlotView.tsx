// The plot block: a run's b-plane or distance plot around one approach, drawn by the shared SVG renderers
// (the same pictures the PDF embeds).
import type { ReactNodeViewProps } from '@tiptap/react';
import { useMemo } from 'react';
import { safeParseAssessment } from '../../../shared/schemas/assessment';
import { bPlaneSvg, distanceSvg } from '../../../shared/plots';
import { findApproachIndex } from '../approach';
import { useFigureSource } from '../FigureSource';
import { EmbedFrame, NewerRunNote } from './RiskTableView';

export function PlotSvg({ result, kind, body, epochTdbJd }: { result: Record<string, unknown>; kind: string; body: string; epochTdbJd: number }) {
  const svg = useMemo(() => {
    const parsed = safeParseAssessment(result);
    if (!parsed.ok) return { error: `The engine result could not be read (${parsed.error}).` };
    const index = findApproachIndex(parsed.value, body, epochTdbJd);
    if (index === null) return { error: `The run has no ${body} approach near JD ${epochTdbJd.toFixed(2)} TDB.` };
    try {
      return { svg: kind === 'bplane' ? bPlaneSvg(parsed.value, index, { width: 640, height: 560 }) : distanceSvg(parsed.value, index, { width: 720, height: 360 }) };
    } catch (e) {
      return { error: e instanceof Error ? e.message : String(e) };
    }
  }, [result, kind, body, epochTdbJd]);
  if ('error' in svg) return <p className="text-sm text-danger-700">{svg.error}</p>;
  // The SVG is built by our own renderer from numbers, with every text escaped (shared/plots/svg.ts esc()).
  return <div className="mx-auto max-w-2xl [&>svg]:h-auto [&>svg]:w-full" dangerouslySetInnerHTML={{ __html: svg.svg }} />;
}

export function PlotView({ node, selected, updateAttributes }: ReactNodeViewProps) {
  const { runId, kind, body, epochTdbJd } = node.attrs as { runId: number; kind: string; body: string; epochTdbJd: number };
  const lookup = useFigureSource().useRunResult(Number(runId));
  const title = `${kind === 'bplane' ? 'b-plane' : 'Distance'} plot · ${body} · run #${runId}`;
  return (
    <EmbedFrame title={title} selected={selected} testId="plot-block">
      <NewerRunNote runId={Number(runId)} onRebind={(newer) => updateAttributes({ runId: newer })} />
      {lookup.state === 'loading' && <p className="text-sm text-ink-soft">Loading run #{runId}…</p>}
      {lookup.state === 'missing' && <p className="text-sm text-ink-soft">{lookup.message}</p>}
      {lookup.state === 'ok' && <PlotSvg result={lookup.result} kind={kind} body={body} epochTdbJd={Number(epochTdbJd)} />}
    </EmbedFrame>
  );
}
