// Dialogs of the workflow actions other than review: submit (a written reason is required when figures are out of
// date, and kept), and the simple ones (revise, start a new version, withdraw) with a comment when the table asks.
import { useState } from 'react';
import { FIGURE_QUANTITY_LABELS } from '../../../shared/bulletins/document';
import { BULLETIN_ACTION_LABELS, findTransition, type BulletinAction } from '../../../shared/bulletins/workflow';
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { useTransition } from '../../api/bulletins';
import { ConfirmDialog } from '../../components/ConfirmDialog';

/** Minimum length of the stale-figure reason (the staleReason guard of shared/bulletins/workflow.ts). */
const MIN_REASON = 10;

export function SubmitDialog({ bulletin, open, onClose, prepare }: { bulletin: Bulletin; open: boolean; onClose: () => void; prepare: () => Promise<boolean> }) {
  const transition = useTransition(bulletin.id);
  const [reason, setReason] = useState('');
  const stale = bulletin.figures.filter((f) => f.stale);
  const needsReason = stale.length > 0;
  const [saveError, setSaveError] = useState<string | null>(null);
  return (
    <ConfirmDialog
      open={open}
      title="Submit for review"
      confirmLabel="Submit for review"
      busy={transition.isPending}
      confirmDisabled={needsReason && reason.trim().length < MIN_REASON}
      error={transition.error ?? (saveError ? new Error(saveError) : null)}
      onCancel={() => {
        transition.reset();
        onClose();
      }}
      onConfirm={async () => {
        setSaveError(null);
        if (!(await prepare())) return setSaveError('The latest changes could not be saved; resolve that first.');
        transition.mutate({ action: 'submit', staleReason: needsReason ? reason.trim() : undefined }, { onSuccess: onClose });
      }}
    >
      <p>A reviewer other than you will check every figure against its run and sign off. You cannot edit the draft while it is in review.</p>
      {needsReason && (
        <>
          <p className="font-medium text-signal-700">
            {stale.length} figure{stale.length === 1 ? ' is' : 's are'} bound to an out-of-date run:
          </p>
          <ul className="list-disc pl-5">
            {stale.map((f) => (
              <li key={f.index}>
                {FIGURE_QUANTITY_LABELS[f.attrs.quantity]}: {f.value?.text ?? '—'} (run #{f.attrs.runId}); run #{f.latestRunId} gives {f.latestValue?.text ?? 'no matching value'}
              </li>
            ))}
          </ul>
          <div>
            <label htmlFor="stale-reason" className="mb-1 block font-medium text-ink">
              Why submit with these figures? (kept with the bulletin)
            </label>
            <textarea
              id="stale-reason"
              rows={3}
              className="block w-full rounded-md border border-rule p-2 text-sm text-ink"
              value={reason}
              onChange={(e) => setReason(e.target.value)}
              required
              minLength={MIN_REASON}
            />
            <p className="mt-1 text-xs">At least {MIN_REASON} characters. Or cancel and use "Rebind" on each figure.</p>
          </div>
        </>
      )}
    </ConfirmDialog>
  );
}

export function SimpleActionDialog({ bulletin, action, onClose }: { bulletin: Bulletin; action: BulletinAction | null; onClose: () => void }) {
  const transition = useTransition(bulletin.id);
  const [comment, setComment] = useState('');
  const t = action ? findTransition(bulletin.state, action) : undefined;
  const required = !!t?.commentRequired;
  return (
    <ConfirmDialog
      open={action !== null}
      title={action ? BULLETIN_ACTION_LABELS[action] : ''}
      confirmLabel={action ? BULLETIN_ACTION_LABELS[action] : 'OK'}
      tone={action === 'withdraw' ? 'danger' : 'primary'}
      busy={transition.isPending}
      confirmDisabled={required && !comment.trim()}
      error={transition.error}
      onCancel={() => {
        transition.reset();
        setComment('');
        onClose();
      }}
      onConfirm={() =>
        action &&
        transition.mutate(
          { action, comment: comment.trim() || undefined },
          {
            onSuccess: () => {
              setComment('');
              onClose();
            },
          },
        )
      }
    >
      {action === 'withdraw' && <p>The bulletin is withdrawn for everyone. Locked versions stay readable in the history.</p>}
      {action === 'amend' && <p>A new draft version starts from the approved text. The approved version stays as it is until the new one is approved.</p>}
      {action === 'revise' && <p>The draft returns to editing with the reviewer's comments.</p>}
      <div>
        <label htmlFor="action-comment" className="mb-1 block font-medium text-ink">
          Comment{required ? '' : ' (optional)'}
        </label>
        <textarea id="action-comment" rows={3} className="block w-full rounded-md border border-rule p-2 text-sm text-ink" value={comment} onChange={(e) => setComment(e.target.value)} required={required} />
      </div>
    </ConfirmDialog>
  );
}
