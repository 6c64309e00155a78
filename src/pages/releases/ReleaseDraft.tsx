// Editing the public wording of a release draft: title, summary and text in the bulletin editor (TipTap), with the
// figures copied from the bulletin version offered for insertion (their values are the frozen snapshots; the editor's
// own run-based figure, risk-table and plot tools are hidden because public text takes no live run data).
// Every change is saved about a second after typing stops with the revision it was made on; a 409 answer stops
// saving and says who saved in between (nothing typed is dropped: the text stays in the editor).
import type { Editor } from '@tiptap/react';
import { useCallback, useEffect, useRef, useState } from 'react';
import type { BulletinDocument } from '../../../shared/bulletins/document';
import { MAX_RELEASE_SUMMARY, MAX_RELEASE_TITLE, type Release } from '../../../shared/schemas/releases';
import { releaseSaveConflict, useSaveRelease } from '../../api/releases';
import { BulletinEditor } from '../../editor/BulletinEditor';
import { useFrozenFigureSource } from '../../editor/sources';
import { Button, errorMessage, Notice, Spinner } from '../../components/ui';
import { CopiedFigures } from './ReleaseParts';

export const RELEASE_AUTOSAVE_DELAY_MS = 1000;

type Draft = { title: string; summary: string; document: BulletinDocument };
export type ReleaseSaveStatus = { kind: 'saved'; revision: number } | { kind: 'dirty' } | { kind: 'saving' } | { kind: 'conflict'; current: Release } | { kind: 'error'; message: string };

export type ReleaseDraftHandle = { flush: () => Promise<boolean> };

function useReleaseAutosave(release: Release) {
  const save = useSaveRelease(release.id);
  const base = useRef(release.revision);
  const draft = useRef<Draft>({ title: release.title, summary: release.summary, document: release.document });
  const edits = useRef(0);
  const savedEdits = useRef(0);
  const inFlight = useRef<Promise<boolean> | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const stopped = useRef(false);
  const [status, setStatus] = useState<ReleaseSaveStatus>({ kind: 'saved', revision: release.revision });
  const mutate = save.mutateAsync;
  // an emptied headline is saved as the last stored one (a ref: a new title from the server must not re-create run())
  const storedTitle = useRef(release.title);
  storedTitle.current = release.title;

  const run = useCallback(async (): Promise<boolean> => {
    if (stopped.current) return false;
    if (inFlight.current) await inFlight.current;
    const sentAt = edits.current;
    const d = draft.current;
    setStatus({ kind: 'saving' });
    const p = (async () => {
      try {
        const r = await mutate({ revision: base.current, title: d.title.trim() || storedTitle.current, summary: d.summary, document: d.document });
        base.current = r.revision;
        savedEdits.current = sentAt;
        setStatus(edits.current === sentAt ? { kind: 'saved', revision: r.revision } : { kind: 'dirty' });
        return edits.current === sentAt;
      } catch (e) {
        const current = releaseSaveConflict(e);
        if (current) {
          stopped.current = true;
          setStatus({ kind: 'conflict', current });
        } else setStatus({ kind: 'error', message: errorMessage(e) });
        return false;
      }
    })();
    inFlight.current = p;
    const ok = await p;
    inFlight.current = null;
    return ok;
  }, [mutate]);

  const change = useCallback(
    (patch: Partial<Draft>) => {
      draft.current = { ...draft.current, ...patch };
      edits.current++;
      if (stopped.current) return;
      setStatus({ kind: 'dirty' });
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => {
        timer.current = null;
        void run();
      }, RELEASE_AUTOSAVE_DELAY_MS);
    },
    [run],
  );

  const flush = useCallback(async (): Promise<boolean> => {
    if (timer.current) {
      clearTimeout(timer.current);
      timer.current = null;
    }
    if (stopped.current) return false;
    if (inFlight.current) await inFlight.current;
    if (edits.current === savedEdits.current) return true;
    return run();
  }, [run]);

  const keepMine = useCallback(
    (current: Release) => {
      stopped.current = false;
      base.current = current.revision;
      void run();
    },
    [run],
  );

  // leaving the page saves what is pending; closing the tab with unsaved text asks first
  useEffect(() => {
    const warn = (e: BeforeUnloadEvent) => {
      if (edits.current !== savedEdits.current && !stopped.current) e.preventDefault();
    };
    window.addEventListener('beforeunload', warn);
    return () => {
      window.removeEventListener('beforeunload', warn);
      if (timer.current) {
        clearTimeout(timer.current);
        timer.current = null;
        void run();
      }
    };
  }, [run]);

  return { status, change, flush, keepMine };
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
