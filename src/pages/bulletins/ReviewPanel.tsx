// The reviewer's sign-off: every linked figure confirmed one by one (value, run, solution version, method), a
// comment, then approve (freezes a version) or request changes (a comment saying what to change is required).
// Shown only when the workflow table lets this user approve or request changes (never to the author).
import { useState } from 'react';
import { FIGURE_QUANTITY_LABELS, RISK_QUANTITIES } from '../../../shared/bulletins/document';
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { useTransition } from '../../api/bulletins';
import { Button, Card, Notice, errorMessage } from '../../components/ui';

export function ReviewPanel({ bulletin, canApprove, canRequestChanges }: { bulletin: Bulletin; canApprove: boolean; canRequestChanges: boolean }) {
  const transition = useTransition(bulletin.id);
  const [checked, setChecked] = useState<Set<number>>(new Set());
  const [comment, setComment] = useState('');
  const [tried, setTried] = useState<'approve' | 'request_changes' | null>(null);
  const figures = bulletin.figures;
  const all = figures.length > 0 && figures.every((f) => checked.has(f.index));
  const toggle = (i: number) =>
    setChecked((s) => {
      const n = new Set(s);
      if (n.has(i)) n.delete(i);
      else n.add(i);
      return n;
    });

  return (
    <Card aria-labelledby="review-heading" data-testid="review-panel">
      <h2 id="review-heading" className="text-lg font-semibold">
        Review and sign-off
      </h2>
      <p className="mt-1 text-sm text-ink-soft">
        Check each figure against its run before signing off. Your confirmations and comment are recorded with the approved version.
      </p>
      {figures.length === 0 ? (
        <p className="mt-4 text-sm text-ink-soft">This draft has no linked figures.</p>
      ) : (
        <fieldset className="mt-4">
          <legend className="mb-2 text-sm font-medium">Figures to confirm ({checked.size} of {figures.length})</legend>
          <ul className="divide-y divide-rule rounded-md border border-rule">
            {figures.map((f) => {
              const risk = RISK_QUANTITIES.includes(f.attrs.quantity);
              return (
                <li key={f.index}>
                  <label className="flex cursor-pointer items-start gap-3 px-3 py-2.5 hover:bg-accent-50/50">
                    <input type="checkbox" className="mt-1 size-4 accent-accent-700" checked={checked.has(f.index)} onChange={() => toggle(f.index)} disabled={!f.value} />
                    <span className="min-w-0 flex-1 text-sm">
                      <span className="font-medium">
                        {f.index + 1}. {FIGURE_QUANTITY_LABELS[f.attrs.quantity]}
                        {risk && <span className="ml-2 rounded bg-signal-50 px-1.5 py-0.5 text-xs font-semibold text-signal-700">risk figure</span>}
                      </span>
                      <span className="mt-0.5 block font-serif text-base tabular-nums">{f.value ? f.value.text : <span className="text-danger-700">{f.problem}</span>}</span>
                      <span className="block text-xs text-ink-soft">
                        run #{f.attrs.runId}
                        {f.value && ` · solution v${f.value.provenance.solutionVersion}`}
                        {f.value?.method && ` · ${f.value.method}`}
                        {f.attrs.body && ` · ${f.attrs.body} JD ${f.attrs.epochTdbJd?.toFixed(2)} TDB`}
                      </span>
                      {f.stale && (
                        <span className="mt-1 block text-xs font-medium text-signal-700">
                          Out of date: run #{f.latestRunId} gives {f.latestValue?.text ?? 'no matching value'}
                        </span>
                      )}
                    </span>
                  </label>
                </li>
              );
            })}
          </ul>
        </fieldset>
      )}
      {bulletin.staleReason && (
        <Notice tone="caution" title="The author submitted with out-of-date figures" className="mt-4">
          {bulletin.staleReason}
        </Notice>
      )}
      <div className="mt-4">
        <label htmlFor="review-comment" className="mb-1 block text-sm font-medium">
          Comment
        </label>
        <textarea
          id="review-comment"
          rows={3}
          className="block w-full rounded-md border border-rule p-2 text-sm"
          value={comment}
          onChange={(e) => setComment(e.target.value)}
          aria-describedby="review-comment-hint"
        />
        <p id="review-comment-hint" className="mt-1 text-xs text-ink-soft">
          Required when requesting changes: say what should change.
        </p>
      </div>
      {tried === 'request_changes' && !comment.trim() && <Notice tone="error" className="mt-3">Write what should change before requesting changes.</Notice>}
      {transition.isError && <Notice tone="error" className="mt-3">{errorMessage(transition.error)}</Notice>}
      <div className="mt-4 flex flex-wrap gap-2">
        {canApprove && (
          <Button
            busy={transition.isPending && tried === 'approve'}
            disabled={!all && figures.length > 0}
            onClick={() => {
              setTried('approve');
              transition.mutate({
                action: 'approve',
                comment: comment.trim() || undefined,
                revision: bulletin.revision,
                confirmedFigures: figures.filter((f) => checked.has(f.index)).map((f) => ({ index: f.index, runId: f.attrs.runId, quantity: f.attrs.quantity })),
              });
            }}
          >
            Approve and sign off
          </Button>
        )}
        {canRequestChanges && (
          <Button
            variant="secondary"
            busy={transition.isPending && tried === 'request_changes'}
            onClick={() => {
              setTried('request_changes');
              if (comment.trim()) transition.mutate({ action: 'request_changes', comment: comment.trim(), revision: bulletin.revision });
            }}
          >
            Request changes
          </Button>
        )}
      </div>
      {canApprove && !all && figures.length > 0 && <p className="mt-2 text-xs text-ink-soft">Approve is available once every figure is confirmed.</p>}
    </Card>
  );
}
