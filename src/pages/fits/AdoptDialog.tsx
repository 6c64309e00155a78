// Adopt one fit of a job as the object's next solution version: the analyst chooses which fit and must give the
// reason (recorded with the version). On success the new version is opened on the object page.
import { useState } from 'react';
import { useNavigate } from 'react-router';
import type { AdoptFitBody, FitJob } from '../../../shared/schemas/odApi';
import { adoptFitBodySchema } from '../../../shared/schemas/odApi';
import type { OrbitDeterminationResult } from '../../../shared/schemas/od';
import { fieldErrors } from '../../api/client';
import { useAdoptFit } from '../../api/od';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { FIT_LABELS, fixed } from './format';

export function AdoptDialog({ fit, result, open, onClose }: { fit: FitJob; result: OrbitDeterminationResult; open: boolean; onClose: () => void }) {
  const navigate = useNavigate();
  const adopt = useAdoptFit(fit);
  const choices = [result.gravityOnly, ...(result.nonGrav ? [result.nonGrav] : [])].filter((f) => f.status !== 'failed');
  const [which, setWhich] = useState<AdoptFitBody['which'] | null>(choices.length === 1 ? choices[0].label : null);
  const [reason, setReason] = useState('');
  const [errors, setErrors] = useState<{ which?: string; reason?: string }>({});
  const serverField = fieldErrors(adopt.error).reason;

  const confirm = () => {
    const parsed = adoptFitBodySchema.safeParse({ which, reason });
    if (!parsed.success) {
      const reasonIssue = parsed.error.issues.find((i) => i.path[0] === 'reason');
      setErrors({ which: which === null ? 'Choose which fit to adopt.' : undefined, reason: reasonIssue?.message });
      return;
    }
    setErrors({});
    adopt.mutate(parsed.data, {
      onSuccess: ({ version }) => navigate(`/objects/${fit.objectId}?version=${version}`),
    });
  };
  const reasonError = errors.reason ?? serverField;

  return (
    <ConfirmDialog
      open={open}
      title="Adopt a fit as a new solution version"
      confirmLabel="Adopt"
      busy={adopt.isPending}
      error={adopt.isError && !serverField ? adopt.error : undefined}
      onCancel={() => {
        adopt.reset();
        onClose();
      }}
      onConfirm={confirm}
    >
      <p>The chosen fit becomes the next solution version of {fit.designation}, with your reason recorded; runs can then use it.</p>
      {result.comparison && <p className="border-l-2 border-accent-700 pl-2 text-ink">{result.comparison.verdict}</p>}
      <fieldset>
        <legend className="mb-1 font-medium text-ink">Which fit</legend>
        {choices.map((f) => (
          <label key={f.label} className="flex items-start gap-2 py-1 text-ink">
            <input type="radio" name="adopt-which" className="mt-1" checked={which === f.label} onChange={() => setWhich(f.label)} />
            <span>
              {FIT_LABELS[f.label]}
              <span className="block text-xs text-ink-soft">
                RMS {fixed(f.rmsArcsec, 3)}″ · χ² {fixed(f.chiSquare, 1)} · {f.observationsUsed}/{f.observationsTotal} used{f.status !== 'converged' ? ' · did not converge' : ''}
              </span>
            </span>
          </label>
        ))}
        {errors.which && <p className="mt-1 font-medium text-danger-700">{errors.which}</p>}
      </fieldset>
      <div>
        <label htmlFor="adopt-reason" className="mb-1 block font-medium text-ink">Reason</label>
        <textarea
          id="adopt-reason"
          rows={3}
          className="block w-full rounded-md border border-rule p-2 text-ink aria-[invalid=true]:border-danger-700"
          aria-invalid={reasonError ? true : undefined}
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          placeholder="e.g. A2 at 6 sigma and the gravity-only residuals curve"
        />
        {reasonError && <p className="mt-1 font-medium text-danger-700">{reasonError}</p>}
      </div>
    </ConfirmDialog>
  );
}
