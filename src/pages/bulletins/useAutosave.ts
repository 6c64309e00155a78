// Autosave of a bulletin draft (title and text): the shared revisioned-draft autosave (src/components/useAutosave.ts)
// on PUT /api/bulletins/:id. An emptied title is saved as the last stored one.
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { saveConflict, useSaveBulletin } from '../../api/bulletins';
import { useAutosave as useDraftAutosave, type SaveStatus as DraftSaveStatus } from '../../components/useAutosave';

export { AUTOSAVE_DELAY_MS } from '../../components/useAutosave';

export type SaveStatus = DraftSaveStatus<Bulletin>;

export function useAutosave(bulletin: Bulletin) {
  const save = useSaveBulletin(bulletin.id);
  return useDraftAutosave(bulletin, {
    draftOf: (b) => ({ title: b.title, document: b.document }),
    bodyOf: (d, b) => ({ title: d.title.trim() || b.title, document: d.document }),
    save: save.mutateAsync,
    conflictOf: saveConflict,
  });
}
