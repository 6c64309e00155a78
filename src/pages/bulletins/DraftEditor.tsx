// Editing a draft: title and text with autosave, the save indicator, and the conflict panel (a save against an
// old revision is refused with the stored copy: both copies are shown, nothing is lost, the user chooses).
import type { Editor } from '@tiptap/react';
import { useCallback, useRef, useState } from 'react';
import { documentText, type BulletinDocument } from '../../../shared/bulletins/document';
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { BulletinEditor, DocumentView } from '../../editor/BulletinEditor';
import { useLiveFigureSource } from '../../editor/sources';
import { Button, Notice } from '../../components/ui';
import { SaveIndicator } from './SaveIndicator';
import { useAutosave } from './useAutosave';
import { formatUtc } from '../../../shared/format';

export type DraftHandle = { flush: () => Promise<boolean> };

export function DraftEditor({ bulletin, handle }: { bulletin: Bulletin; handle: React.RefObject<DraftHandle | null> }) {
  const autosave = useAutosave(bulletin);
  handle.current = { flush: autosave.flush };
  const [title, setTitle] = useState(bulletin.title);
  const editorRef = useRef<Editor | null>(null);
  const source = useLiveFigureSource(bulletin.objectId, bulletin.figures, true);
  const viewSource = useLiveFigureSource(bulletin.objectId, bulletin.figures, false);
  const onReady = useCallback((e: Editor) => {
    editorRef.current = e;
  }, []);
  const conflict = autosave.status.kind === 'conflict' ? autosave.status.current : null;
  const [copied, setCopied] = useState(false);
  // After "continue from their copy", the user's own text stays readable beside the editor until dismissed.
  const [previous, setPrevious] = useState<BulletinDocument | null>(null);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="min-w-0 flex-1">
          <label htmlFor="bulletin-title" className="mb-1 block text-sm font-medium">
            Title
          </label>
          <input
            id="bulletin-title"
            className="block h-10 w-full rounded-md border border-rule bg-white px-3 font-serif text-lg"
            value={title}
            maxLength={200}
            onChange={(e) => {
              setTitle(e.target.value);
              autosave.change({ title: e.target.value });
            }}
          />
        </div>
        <SaveIndicator status={autosave.status} />
      </div>

      {conflict && (
        <Notice tone="error" title="Someone saved this draft while you were editing">
          <p>
            {conflict.updatedBy?.name ?? 'Another user'} saved revision {conflict.revision} at {formatUtc(conflict.updatedAt, { seconds: false })}. Your text is
            still in the editor below and has not been saved. Their copy is shown beside it: copy what you need from it, then keep your version or
            continue from theirs.
          </p>
          <div className="mt-3 flex flex-wrap gap-2">
            <Button variant="primary" onClick={() => autosave.keepMine(conflict)}>
              Keep my version (save over revision {conflict.revision})
            </Button>
            <Button
              variant="secondary"
              onClick={async () => {
                await navigator.clipboard?.writeText(documentText(autosave.draft.current.document)).catch(() => undefined);
                setCopied(true);
              }}
            >
              {copied ? 'My text is copied' : 'Copy my text'}
            </Button>
            <Button
              variant="secondary"
              onClick={() => {
                setPrevious(autosave.draft.current.document);
                editorRef.current?.commands.setContent(conflict.document, { emitUpdate: false });
                setTitle(conflict.title);
                autosave.takeTheirs(conflict);
              }}
            >
              Continue from their copy
            </Button>
          </div>
        </Notice>
      )}

      <div className={conflict || previous ? 'grid gap-4 lg:grid-cols-2' : ''}>
        <div>
          {conflict && <h3 className="mb-2 text-sm font-semibold">Your copy (not saved)</h3>}
          <BulletinEditor document={bulletin.document} source={source} editable onChange={(doc) => autosave.change({ document: doc })} onReady={onReady} />
        </div>
        {conflict && <TheirCopy current={conflict} />}
        {!conflict && previous && (
          <div data-testid="previous-copy">
            <div className="mb-2 flex items-center justify-between gap-2">
              <h3 className="text-sm font-semibold">Your earlier text (not saved; copy what you need)</h3>
              <Button variant="quiet" className="!px-2 !py-1" onClick={() => setPrevious(null)}>
                Dismiss
              </Button>
            </div>
            <div className="rounded-lg border border-rule bg-white p-4">
              <DocumentView document={previous} source={viewSource} />
            </div>
          </div>
        )}
      </div>
    </div>
  );
}

function TheirCopy({ current }: { current: Bulletin }) {
  const source = useLiveFigureSource(current.objectId, current.figures, false);
  return (
    <div data-testid="conflict-current-copy">
      <h3 className="mb-2 text-sm font-semibold">
        Stored copy · revision {current.revision} · {current.title}
      </h3>
      <div className="rounded-lg border border-danger-200 bg-white p-4">
        <DocumentView document={current.document} source={source} />
      </div>
    </div>
  );
}
