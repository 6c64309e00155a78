// The risk-table block: a run's encounter table (the results area's EncounterTable, with its unit switch),
// embedded read-only in the bulletin.
import { NodeViewWrapper, type ReactNodeViewProps } from '@tiptap/react';
import { useId, useMemo, useState } from 'react';
import type { DistanceUnit } from '../../../shared/format';
import { safeParseAssessment } from '../../../shared/schemas/assessment';
import type { Run } from '../../../shared/schemas/runs';
import { EncounterTable } from '../../components/results/EncounterTable';
import { resultSource } from '../../components/results/RunResults';
import { UnitSwitch } from '../../components/results/UnitSwitch';
import { useFigureSource } from '../FigureSource';

/** "A newer run exists" with one action to rebind the block to it (drafts only). */
export function NewerRunNote({ runId, onRebind }: { runId: number; onRebind: (newer: number) => void }) {
  const newer = useFigureSource().useNewerRun(runId);
  if (newer === null) return null;
  return (
    <p className="mb-2 flex flex-wrap items-center gap-2 rounded border border-signal-200 bg-signal-50 px-2 py-1 text-xs text-signal-700" data-testid="stale-block">
      <span className="font-semibold">Out of date:</span> run #{newer} of this object is newer.
      <button type="button" className="rounded border border-signal-200 bg-white px-1.5 font-medium text-accent-700 hover:bg-accent-50" onClick={() => onRebind(newer)}>
        Show run #{newer} instead
      </button>
    </p>
  );
}

export function EmbedFrame({ title, selected, children, testId, tools }: { title: string; selected: boolean; children: React.ReactNode; testId: string; tools?: React.ReactNode }) {
  return (
    <NodeViewWrapper
      contentEditable={false}
      data-testid={testId}
      className={`my-4 rounded-md border bg-white p-3 font-sans ${selected ? 'border-accent-600 ring-2 ring-accent-600/40' : 'border-rule'}`}
    >
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <p className="text-xs font-semibold tracking-wide text-ink-soft uppercase" data-drag-handle>
          {title}
        </p>
        {tools}
      </div>
      {children}
    </NodeViewWrapper>
  );
}

function EmbeddedTable({ run, result, unit }: { run: Run; result: Record<string, unknown>; unit: DistanceUnit }) {
  const parsed = useMemo(() => safeParseAssessment(result), [result]);
  if (!parsed.ok) return <p className="text-sm text-danger-700">The engine result of run #{run.id} could not be read ({parsed.error}).</p>;
  // The table's per-row "Plot" buttons belong to the run page (they pick the plotted approach); a bulletin embeds
  // plots as their own blocks, so they are hidden here.
  return (
    <div className="[&_tbody_button]:hidden">
      <EncounterTable result={parsed.value} source={resultSource(run, parsed.value)} unit={unit} selected={null} onSelect={() => undefined} />
    </div>
  );
}

export function RiskTableView({ node, selected, updateAttributes }: ReactNodeViewProps) {
  const runId = Number(node.attrs.runId);
  const lookup = useFigureSource().useRunResult(runId);
  const [unit, setUnit] = useState<DistanceUnit>('km');
  const unitName = useId();
  return (
    <EmbedFrame
      title={`Close approaches · run #${runId}`}
      selected={selected}
      testId="risk-table-block"
      tools={lookup.state === 'ok' ? <UnitSwitch value={unit} onChange={setUnit} name={unitName} /> : undefined}
    >
      <NewerRunNote runId={runId} onRebind={(newer) => updateAttributes({ runId: newer })} />
      {lookup.state === 'loading' && <p className="text-sm text-ink-soft">Loading run #{runId}…</p>}
      {lookup.state === 'missing' && <p className="text-sm text-ink-soft">{lookup.message}</p>}
      {lookup.state === 'ok' && <EmbeddedTable run={lookup.run} result={lookup.result} unit={unit} />}
    </EmbedFrame>
  );
}
