// Autosave of a draft: every change is saved about a second after typing stops, with the revision it was made on.
// A 409 answer stops saving and keeps both copies (the user's in the editor, the stored one from the answer) so
// nothing is lost; the user then keeps theirs (saved over the new revision) or takes the stored one.
import { useCallback, useEffect, useRef, useState } from 'react';
import type { BulletinDocument } from '../../../shared/bulletins/document';
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { saveConflict, useSaveBulletin } from '../../api/bulletins';
import { errorMessage } from '../../components/ui';

export const AUTOSAVE_DELAY_MS = 1000;

export type SaveStatus =
  | { kind: 'saved'; revision: number }
  | { kind: 'dirty' }
  | { kind: 'saving' }
  | { kind: 'conflict'; current: Bulletin }
  | { kind: 'error'; message: string };

type Draft = { title: string; document: BulletinDocument };

export function useAutosave(bulletin: Bulletin) {
  const save = useSaveBulletin(bulletin.id);
  const base = useRef(bulletin.revision);
  const draft = useRef<Draft>({ title: bulletin.title, document: bulletin.document });
  const edits = useRef(0); // bumped on every change; a save is complete when no edit came in during it
  const savedEdits = useRef(0); // the edit count the last successful save stored
  const inFlight = useRef<Promise<boolean> | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const [status, setStatus] = useState<SaveStatus>({ kind: 'saved', revision: bulletin.revision });
  const conflicted = useRef(false);

  const run = useCallback(async (): Promise<boolean> => {
    if (conflicted.current) return false;
    if (inFlight.current) await inFlight.current;
    const sentAt = edits.current;
    const body = { revision: base.current, title: draft.current.title.trim() || bulletin.title, document: draft.current.document };
    setStatus({ kind: 'saving' });
    const p = (async () => {
      try {
        const b = await save.mutateAsync(body);
        base.current = b.revision;
        savedEdits.current = sentAt;
        if (edits.current === sentAt) setStatus({ kind: 'saved', revision: b.revision });
        else setStatus({ kind: 'dirty' });
        return edits.current === sentAt;
      } catch (e) {
        const current = saveConflict(e);
        if (current) {
          conflicted.current = true;
          setStatus({ kind: 'conflict', current });
        } else setStatus({ kind: 'error', message: errorMessage(e) });
        return false;
      }
    })();
    inFlight.current = p;
    const ok = await p;
    inFlight.current = null;
    // edits that came in while this save was in flight are saved next
    if (edits.current !== sentAt && !conflicted.current) schedule();
    return ok;
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [bulletin.id]);

  const schedule = useCallback(() => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => {
      timer.current = null;
      void run();
    }, AUTOSAVE_DELAY_MS);
  }, [run]);

  const change = useCallback(
    (patch: Partial<Draft>) => {
      draft.current = { ...draft.current, ...patch };
      edits.current++;
      if (conflicted.current) return;
      setStatus({ kind: 'dirty' });
      schedule();
    },
    [schedule],
  );

  /** Save now (before a transition); resolves true when everything typed is stored. */
  const flush = useCallback(async (): Promise<boolean> => {
    if (timer.current) {
      clearTimeout(timer.current);
      timer.current = null;
    }
    if (conflicted.current) return false;
    if (inFlight.current) await inFlight.current;
    if (edits.current === savedEdits.current) return true;
    return run();
  }, [run]);

  /** After a conflict: keep the user's copy, saved over the stored revision. */
  const keepMine = useCallback(
    (current: Bulletin) => {
      conflicted.current = false;
      base.current = current.revision;
      void run();
    },
    [run],
  );

  /** After a conflict: continue from the stored copy (the caller puts it in the editor). */
  const takeTheirs = useCallback((current: Bulletin) => {
    conflicted.current = false;
    base.current = current.revision;
    draft.current = { title: current.title, document: current.document };
    savedEdits.current = edits.current;
    setStatus({ kind: 'saved', revision: current.revision });
  }, []);

  // Leaving the page: save what is pending at once (the mutation outlives the component); closing the tab with
  // unsaved text asks first.
  useEffect(() => {
    const warn = (e: BeforeUnloadEvent) => {
      if (edits.current !== savedEdits.current && !conflicted.current) e.preventDefault();
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

  return { status, change, flush, keepMine, takeTheirs, draft, baseRevision: base };
}
