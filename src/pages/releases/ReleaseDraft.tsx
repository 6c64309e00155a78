// Editing the public wording of a release draft: title, summary and text in the bulletin editor (TipTap), with the
// figures copied from the bulletin version offered for insertion (their values are the frozen snapshots; the editor's
// own run-based figure, risk-table and plot tools are hidden because public text takes no live run data).
// Every change is saved about a second after typing stops with the revision it was made on; a 409 answer stops
// saving and says who saved in between (nothing typed is dropped: the text stays in the editor).
import type { Editor } from '@tiptap/react';
import { useCallback, useRef, useState } from 'react';
import { MAX_RELEASE_SUMMARY, MAX_RELEASE_TITLE, type Release } from '../../../shared/schemas/releases';
import { releaseSaveConflict, useSaveRelease } from '../../api/releases';
import { BulletinEditor } from '../../editor/BulletinEditor';
import { useFrozenFigureSource } from '../../editor/sources';
import { Button, Notice, Spinner } from '../../components/ui';
import { useAutosave, type SaveStatus } from '../../components/useAutosave';
import { CopiedFigures } from './ReleaseParts';

export type ReleaseSaveStatus = SaveStatus<Release>;

export type ReleaseDraftHandle = { flush: () => Promise<boolean> };

/** The shared revisioned-draft autosave on PUT /api/releases/:id; an emptied headline is saved as the last stored one. */
function useReleaseAutosave(release: Release) {
  const save = useSaveRelease(release.id);
  return useAutosave(release, {
    draftOf: (r) => ({ title: r.title, summary: r.summary, document: r.document }),
    bodyOf: (d, r) => ({ title: d.title.trim() || r.title, summary: d.summary, document: d.document }),
    save: save.mutateAsync,
    conflictOf: releaseSaveConflict,
  });
}

function SaveState({ status }: { status: ReleaseSaveStatus }) {
  const text =
    status.kind === 'saved'
      ? `Saved · revision ${status.revision}`
      : status.kind === 'dirty'
        ? 'Unsaved changes'
        : status.kind === 'saving'
          ? 'Saving…'
          : status.kind === 'conflict'
            ? `Not saved: revision ${status.current.revision} was saved by ${status.current.updatedBy?.name ?? 'someone else'} meanwhile`
            : `Not saved: ${status.message}`;
  const tone = status.kind === 'saved' ? 'text-ok-700' : status.kind === 'conflict' || status.kind === 'error' ? 'text-danger-700' : 'text-ink-soft';
  return (
    <p role="status" aria-live="polite" className={`flex items-center gap-2 text-sm ${tone}`} data-testid="release-save-status" data-save-state={status.kind}>
      {status.kind === 'saving' && <Spinner className="size-3" />}
      {text}
    </p>
  );
}

/** The generated plain-language sentences, each ready to put into the text at the cursor. */
function PlainSentences({ release, onInsert }: { release: Release; onInsert: (text: string) => void }) {
  const plain = release.plainLanguage;
  const sentences = [
    ...plain.statements.map((s) => ({ key: `s${s.figureIndex}`, label: s.label, text: `${s.label}: ${s.text}.` })),
    { key: 'uncertainty', label: 'How certain', text: plain.uncertainty },
  ];
  return (
    <section aria-labelledby="plain-sentences-heading" className="rounded-lg border border-rule bg-white p-5" data-testid="plain-sentences">
      <h2 id="plain-sentences-heading" className="text-lg font-semibold">
        Plain-language sentences
      </h2>
      <p className="mt-1 text-sm text-ink-soft">Generated from the copied figures; use them as they are, or reword without adding certainty.</p>
      <ul className="mt-3 divide-y divide-rule">
        {sentences.map((s) => (
          <li key={s.key} className="py-2 text-sm">
            <p className="font-serif">{s.text}</p>
            <Button variant="quiet" className="mt-1 !px-2 !py-1" onClick={() => onInsert(s.text)} aria-label={`Insert the sentence "${s.label}" into the text`}>
              Insert in text
            </Button>
          </li>
        ))}
      </ul>
    </section>
  );
}

/** Hides the editor's run-based tools (figure from a run, risk table, plot): public text uses the copied figures. */
const HIDE_RUN_TOOLS =
  "[&_button[aria-label='Insert_figure']]:hidden [&_button[aria-label='Insert_risk_table']]:hidden [&_button[aria-label='Insert_plot']]:hidden";

export function ReleaseDraft({ release, handle }: { release: Release; handle: React.RefObject<ReleaseDraftHandle | null> }) {
  const autosave = useReleaseAutosave(release);
  handle.current = { flush: autosave.flush };
  const [title, setTitle] = useState(release.title);
  const [summary, setSummary] = useState(release.summary);
  const editorRef = useRef<Editor | null>(null);
  const source = useFrozenFigureSource(release.figures);
  const onReady = useCallback((e: Editor) => {
    editorRef.current = e;
  }, []);
  const conflict = autosave.status.kind === 'conflict' ? autosave.status.current : null;

  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(16rem,1fr)]">
      <div className="space-y-4">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div className="min-w-0 flex-1">
            <label htmlFor="release-title" className="mb-1 block text-sm font-medium">
              Headline
            </label>
            <input
              id="release-title"
              className="block h-10 w-full rounded-md border border-rule bg-white px-3 font-serif text-lg"
              value={title}
              maxLength={MAX_RELEASE_TITLE}
              onChange={(e) => {
                setTitle(e.target.value);
                autosave.change({ title: e.target.value });
              }}
            />
          </div>
          <SaveState status={autosave.status} />
        </div>
        <div>
          <label htmlFor="release-summary" className="mb-1 block text-sm font-medium">
            Summary (list and feed)
          </label>
          <textarea
            id="release-summary"
            rows={2}
            maxLength={MAX_RELEASE_SUMMARY}
            className="block w-full rounded-md border border-rule bg-white p-2 text-base"
            value={summary}
            onChange={(e) => {
              setSummary(e.target.value);
              autosave.change({ summary: e.target.value });
            }}
          />
        </div>
        {conflict && (
          <Notice tone="error" title="Someone saved this draft while you were editing">
            <p>
              {conflict.updatedBy?.name ?? 'Another user'} saved revision {conflict.revision}. Your text is still in the editor and has not been saved.
            </p>
            <Button className="mt-2" onClick={() => autosave.keepMine(conflict)}>
              Keep my version (save over revision {conflict.revision})
            </Button>
          </Notice>
        )}
        <div className={HIDE_RUN_TOOLS}>
          <BulletinEditor
            document={release.document}
            source={source}
            editable
            label="Release text"
            onChange={(doc) => autosave.change({ document: doc })}
            onReady={onReady}
          />
        </div>
      </div>
      <div className="space-y-4">
        <CopiedFigures
          figures={release.figures}
          source={release.source}
          onInsert={(f) => editorRef.current?.chain().focus().insertLinkedFigure({ runId: f.attrs.runId, quantity: f.attrs.quantity, body: f.attrs.body, epochTdbJd: f.attrs.epochTdbJd }).run()}
        />
        <PlainSentences release={release} onInsert={(text) => editorRef.current?.chain().focus().insertContent(text).run()} />
      </div>
    </div>
  );
}
