// State badge of a bulletin or a locked version.
import { BULLETIN_STATE_LABELS, type BulletinState } from '../../../shared/bulletins/workflow';

const TONES: Record<BulletinState, string> = {
  draft: 'bg-white text-ink border-rule',
  in_review: 'bg-accent-50 text-accent-800 border-accent-100',
  changes_requested: 'bg-signal-50 text-signal-700 border-signal-200',
  approved: 'bg-ok-50 text-ok-700 border-ok-700/30',
  distributed: 'bg-ok-50 text-ok-700 border-ok-700/30',
  withdrawn: 'bg-danger-50 text-danger-700 border-danger-200',
  superseded: 'bg-white text-ink-soft border-rule',
};

export function BulletinStateBadge({ state }: { state: BulletinState }) {
  return (
    <span className={`inline-block rounded border px-2 py-0.5 text-xs font-semibold whitespace-nowrap ${TONES[state]}`} data-testid="bulletin-state">
      {BULLETIN_STATE_LABELS[state]}
    </span>
  );
}
