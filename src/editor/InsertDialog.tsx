// Choosing what to insert: a linked figure (run, quantity and, for approach quantities, the approach), a risk table
// (run) or a plot (run, kind, approach). Only finished runs of the bulletin's object are offered.
import { useEffect, useId, useRef, useState } from 'react';
import { FIGURE_QUANTITIES, FIGURE_QUANTITY_LABELS, OBJECT_LEVEL_QUANTITIES, type FigureQuantity } from '../../shared/bulletins/document';
import { formatDistance, formatUtc } from '../../shared/format';
import { safeParseAssessment } from '../../shared/schemas/assessment';
import { useObjectRuns } from '../api/runs';
import { Button, Notice, SelectField } from '../components/ui';
import { previewFigure } from './preview';
import { useRunQuery } from './sources';

export type InsertKind = 'figure' | 'riskTable' | 'plot';

export type InsertChoice =
  | { kind: 'figure'; attrs: { runId: number; quantity: FigureQuantity; body: string | null; epochTdbJd: number | null } }
  | { kind: 'riskTable'; attrs: { runId: number } }
  | { kind: 'plot'; attrs: { runId: number; kind: 'bplane' | 'distance'; body: string; epochTdbJd: number } };

const TITLES: Record<InsertKind, string> = { figure: 'Insert a linked figure', riskTable: 'Insert a risk table', plot: 'Insert a plot' };

export function InsertDialog({ kind, objectId, onInsert, onClose }: { kind: InsertKind | null; objectId: number; onInsert: (c: InsertChoice) => void; onClose: () => void }) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (kind && !d.open) d.showModal();
    if (!kind && d.open) d.close();
  }, [kind]);
  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      className="m-auto w-[min(36rem,calc(100vw-2rem))] rounded-lg border border-rule bg-white p-0 text-ink shadow-xl backdrop:bg-ink/40"
    >
      {kind && (
        <InsertForm key={kind} kind={kind} objectId={objectId} titleId={titleId} onInsert={onInsert} onClose={onClose} />
      )}
    </dialog>
  );
}

function InsertForm({ kind, objectId, titleId, onInsert, onClose }: { kind: InsertKind; objectId: number; titleId: string; onInsert: (c: InsertChoice) => void; onClose: () => void }) {
  const runs = useObjectRuns(objectId);
  const done = (runs.data ?? []).filter((r) => r.status === 'done');
  const [runId, setRunId] = useState<number | null>(null);
  const chosenRunId = runId ?? done[0]?.id ?? null;
  const run = useRunQuery(chosenRunId ?? 0, chosenRunId !== null);
  const [quantity, setQuantity] = useState<FigureQuantity>('impactProbability');
  const [approach, setApproach] = useState(0);
  const [plotKind, setPlotKind] = useState<'bplane' | 'distance'>('bplane');

  const parsed = run.data?.result && chosenRunId !== null ? safeParseAssessment(run.data.result) : null;
  const approaches = parsed?.ok ? parsed.value.approaches : [];
  const needsApproach = kind === 'plot' || (kind === 'figure' && !OBJECT_LEVEL_QUANTITIES.includes(quantity));
  const a = approaches[approach] ?? null;

  let choice: InsertChoice | null = null;
  if (chosenRunId !== null && parsed?.ok) {
    if (kind === 'riskTable') choice = { kind, attrs: { runId: chosenRunId } };
    else if (kind === 'plot' && a) choice = { kind, attrs: { runId: chosenRunId, kind: plotKind, body: a.body, epochTdbJd: a.epochTdbJd } };
    else if (kind === 'figure' && (!needsApproach || a))
      choice = { kind, attrs: { runId: chosenRunId, quantity, body: needsApproach && a ? a.body : null, epochTdbJd: needsApproach && a ? a.epochTdbJd : null } };
  }
  const preview = choice?.kind === 'figure' && run.data ? previewFigure(run.data, choice.attrs) : null;

  return (
    <form
      className="p-6"
      onSubmit={(e) => {
        e.preventDefault();
        if (choice) onInsert(choice);
      }}
    >
      <h2 id={titleId} className="text-lg font-bold">
        {TITLES[kind]}
      </h2>
      <div className="mt-4 space-y-4">
        {runs.isPending && <p className="text-sm text-ink-soft">Loading the object's runs…</p>}
        {runs.isSuccess && done.length === 0 && (
          <Notice tone="caution">This object has no finished assessment run yet. Start one from the object page first.</Notice>
        )}
        {done.length > 0 && (
          <SelectField label="Run" value={chosenRunId ?? ''} onChange={(e) => { setRunId(Number(e.target.value)); setApproach(0); }}>
            {done.map((r) => (
              <option key={r.id} value={r.id}>
                Run #{r.id} · solution v{r.solutionVersion} · {r.options.methods.join(', ')} · {formatUtc(r.finishedAt, { seconds: false })}
              </option>
            ))}
          </SelectField>
        )}
        {kind === 'figure' && (
          <SelectField label="Quantity" value={quantity} onChange={(e) => setQuantity(e.target.value as FigureQuantity)}>
            {FIGURE_QUANTITIES.map((q) => (
              <option key={q} value={q}>
                {FIGURE_QUANTITY_LABELS[q]}
              </option>
            ))}
          </SelectField>
        )}
        {kind === 'plot' && (
          <SelectField label="Plot" value={plotKind} onChange={(e) => setPlotKind(e.target.value as 'bplane' | 'distance')}>
            <option value="bplane">b-plane (target plane) with uncertainty</option>
            <option value="distance">Distance around the encounter</option>
          </SelectField>
        )}
        {needsApproach && run.data && parsed?.ok && (
          approaches.length === 0 ? (
            <Notice tone="caution">Run #{chosenRunId} found no close approach in its window.</Notice>
          ) : (
            <SelectField label="Approach" value={approach} onChange={(e) => setApproach(Number(e.target.value))}>
              {approaches.map((ap, i) => (
                <option key={i} value={i}>
                  {ap.body} · {formatUtc(ap.utc, { seconds: false })} · {formatDistance(ap.distanceKm)}
                </option>
              ))}
            </SelectField>
          )
        )}
        {chosenRunId !== null && run.isLoading && <p className="text-sm text-ink-soft">Loading run #{chosenRunId}…</p>}
        {parsed && !parsed.ok && <Notice tone="error">The result of run #{chosenRunId} could not be read: {parsed.error}</Notice>}
        {preview && (
          <div className="rounded-md border border-rule bg-paper px-4 py-3" data-testid="figure-preview">
            <p className="text-xs font-semibold tracking-wide text-ink-soft uppercase">Will read</p>
            {'error' in preview ? (
              <p className="mt-1 text-sm text-danger-700">{preview.error}</p>
            ) : (
              <p className="mt-1 font-serif text-lg tabular-nums">{preview.value.text}</p>
            )}
          </div>
        )}
      </div>
      <div className="mt-6 flex justify-end gap-2">
        <Button variant="secondary" onClick={onClose}>
          Cancel
        </Button>
        <Button type="submit" disabled={!choice || (preview !== null && 'error' in preview)}>
          Insert
        </Button>
      </div>
    </form>
  );
}
