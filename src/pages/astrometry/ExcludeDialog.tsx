// Exclude one stored observation from every later fit, with the reason (required; recorded with the observation).
// Used by the astrometry table and by the residual table of a fit.
import { useState } from 'react';
import { useExcludeObservation } from '../../api/od';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { formatObsTime } from './format';

export type ExcludeTarget = { id: number; stn: string; obsTime: string };

export function ExcludeDialog({ objectId, target, onClose, note }: { objectId: number; target: ExcludeTarget | null; onClose: () => void; note?: string }) {
  const exclude = useExcludeObservation(objectId);
  const [reason, setReason] = useState('');
  const close = () => {
    setReason('');
    exclude.reset();
    onClose();
  };
  return (
    <ConfirmDialog
      open={target !== null}
      title={target ? `Exclude ${target.stn} ${formatObsTime(target.obsTime)}?` : ''}
      confirmLabel="Exclude from fits"
      busy={exclude.isPending}
      error={exclude.error}
      confirmDisabled={reason.trim().length < 3}
      onCancel={close}
      onConfirm={() => target && exclude.mutate({ obsId: target.id, excluded: true, reason: reason.trim() }, { onSuccess: close })}
    >
      <p>The observation stays stored and is shown greyed; every later fit leaves it out.{note ? ` ${note}` : ''}</p>
      <label htmlFor="exclude-reason" className="block font-medium text-ink">Reason</label>
      <textarea id="exclude-reason" rows={3} className="block w-full rounded-md border border-rule p-2 text-ink" value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. trailed image, blended with a star" />
    </ConfirmDialog>
  );
}
