// The risk-table block: a run's encounter table, embedded read-only in the bulletin.
import { NodeViewWrapper, type ReactNodeViewProps } from '@tiptap/react';
import { useFigureSource } from '../FigureSource';
import { CompactEncounterTable } from './CompactEncounterTable';

export function EmbedFrame({ title, selected, children, testId }: { title: string; selected: boolean; children: React.ReactNode; testId: string }) {
  return (
    <NodeViewWrapper
      contentEditable={false}
      data-testid={testId}
      className={`my-4 rounded-md border bg-white p-3 ${selected ? 'border-accent-600 ring-2 ring-accent-600/40' : 'border-rule'}`}
    >
      <p className="mb-2 font-sans text-xs font-semibold tracking-wide text-ink-soft uppercase" data-drag-handle>
        {title}
      </p>
      {children}
    </NodeViewWrapper>
  );
}

export function RiskTableView({ node, selected }: ReactNodeViewProps) {
  const runId = Number(node.attrs.runId);
  const lookup = useFigureSource().useRunResult(runId);
  return (
    <EmbedFrame title={`Close approaches · run #${runId}`} selected={selected} testId="risk-table-block">
      {lookup.state === 'loading' && <p className="text-sm text-ink-soft">Loading run #{runId}…</p>}
      {lookup.state === 'missing' && <p className="text-sm text-danger-700">{lookup.message}</p>}
      {lookup.state === 'ok' && <CompactEncounterTable result={lookup.result} runId={runId} />}
    </EmbedFrame>
  );
}
