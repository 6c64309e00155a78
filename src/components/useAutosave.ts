// Autosave of a revisioned draft (bulletins, press releases): every change is saved about a second after typing
// stops, with the revision it was made on. A 409 answer stops saving and keeps both copies (the user's in the
// editor, the stored one from the answer) so nothing is lost; the user then keeps theirs (saved over the new
// revision) or takes the stored one. The server side is server/services/drafts.ts.
import { useCallback, useEffect, useRef, useState } from 'react';
import { errorMessage } from './ui';

export const AUTOSAVE_DELAY_MS = 1000;

export type SaveStatus<T> =
  | { kind: 'saved'; revision: number }
  | { kind: 'dirty' }
  | { kind: 'saving' }
  | { kind: 'conflict'; current: T }
  | { kind: 'error'; message: string };

export interface AutosaveOptions<T, D, B> {
  /** The editable fields of a stored copy (the start, and the copy taken after a conflict). */
  draftOf: (stored: T) => D;
  /** The request body of a save, without the revision; `stored` is the latest stored copy the page holds. */
  bodyOf: (draft: D, stored: T) => B;
  /** Send a save; resolves with the stored copy. */
  save: (body: B & { revision: number }) => Promise<T>;
  /** The stored copy a 409 answer carries, or null when the error is anything else. */
  conflictOf: (error: unknown) => T | null;
}

export function useAutosave<T extends { id: number; revision: number }, D extends object, B>(stored: T, options: AutosaveOptions<T, D, B>) {
  // the latest props and callbacks, read when a save starts (a new copy from the server must not re-create run())
  const latest = useRef({ stored, options });
  latest.current = { stored, options };
  const base = useRef(stored.revision);
  const draft = useRef<D>(options.draftOf(stored));
  const edits = useRef(0); // bumped on every change; a save is complete when no edit came in during it
  const savedEdits = useRef(0); // the edit count the last successful save stored
  const inFlight = useRef<Promise<boolean> | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const [status, setStatus] = useState<SaveStatus<T>>({ kind: 'saved', revision: stored.revision });
  const conflicted = useRef(false);

  const run = useCallback(async (): Promise<boolean> => {
    if (conflicted.current) return false;
    if (inFlight.current) await inFlight.current;
    const sentAt = edits.current;
    const { stored: now, options: o } = latest.current;
    const body = { ...o.bodyOf(draft.current, now), revision: base.current };
    setStatus({ kind: 'saving' });
    const p = (async () => {
      try {
        const saved = await o.save(body);
        base.current = saved.revision;
        savedEdits.current = sentAt;
        setStatus(edits.current === sentAt ? { kind: 'saved', revision: saved.revision } : { kind: 'dirty' });
        return edits.current === sentAt;
      } catch (e) {
        const current = o.conflictOf(e);
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
  }, [stored.id]);

  const schedule = useCallback(() => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => {
      timer.current = null;
      void run();
    }, AUTOSAVE_DELAY_MS);
  }, [run]);

  const change = useCallback(
    (patch: Partial<D>) => {
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
    (current: T) => {
      conflicted.current = false;
      base.current = current.revision;
      void run();
    },
    [run],
  );

  /** After a conflict: continue from the stored copy (the caller puts it in the editor). */
  const takeTheirs = useCallback((current: T) => {
    conflicted.current = false;
    base.current = current.revision;
    draft.current = latest.current.options.draftOf(current);
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
