// The saved / saving / unsaved / conflict indicator of the draft editor (announced politely to screen readers).
import { Spinner } from '../../components/ui';
import type { SaveStatus } from './useAutosave';

export function SaveIndicator({ status }: { status: SaveStatus }) {
  let text: string;
  let tone: string;
  switch (status.kind) {
    case 'saved':
      text = `Saved · revision ${status.revision}`;
      tone = 'text-ok-700';
      break;
    case 'dirty':
      text = 'Unsaved changes';
      tone = 'text-ink-soft';
      break;
    case 'saving':
      text = 'Saving…';
      tone = 'text-ink-soft';
      break;
    case 'conflict':
      text = `Not saved: revision ${status.current.revision} was saved by ${status.current.updatedBy?.name ?? 'someone else'} meanwhile`;
      tone = 'text-danger-700 font-semibold';
      break;
    case 'error':
      text = `Not saved: ${status.message}`;
      tone = 'text-danger-700';
      break;
  }
  return (
    <p role="status" aria-live="polite" className={`flex items-center gap-2 text-sm ${tone}`} data-testid="save-status" data-save-state={status.kind}>
      {status.kind === 'saving' && <Spinner className="size-3" />}
      {status.kind === 'saved' && <span aria-hidden="true">✓</span>}
      {text}
    </p>
  );
}
