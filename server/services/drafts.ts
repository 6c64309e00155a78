// Revisioned drafts (bulletins and press releases): the autosave that writes only on the revision the edit was
// made on. One synchronous better-sqlite3 transaction reads the row and makes a conditional UPDATE (same id, same
// revision, still a draft), so two concurrent saves cannot both succeed; the loser gets 409 with the stored copy
// and nothing is written (the client keeps its own copy, merges and saves again on the current revision).
import { and, eq } from 'drizzle-orm';
import type { AnySQLiteColumn, SQLiteTable, SQLiteUpdateSetSource } from 'drizzle-orm/sqlite-core';
import type { Db } from '../db/client';
import { conflict } from '../errors';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type Reader = Pick<Db, 'select'>;

/** A table of drafts: an id, a revision counted up by every save, a workflow state ('draft' while editable). */
export type DraftTable = SQLiteTable & { id: AnySQLiteColumn; revision: AnySQLiteColumn; state: AnySQLiteColumn };

export interface DraftSave<R extends { state: string; revision: number }, Out> {
  id: number;
  /** The revision the edit was made on. */
  revision: number;
  /** What the draft is, for the refusal: "The bulletin is in review, not a draft". */
  noun: string;
  actorId: number;
  /** Read the row (404 when there is none), inside the transaction or after it. */
  row: (id: number, reader: Reader) => R;
  /** The edited columns, from the stored row (fields left out of the edit keep their stored value). */
  edits: (stored: R) => Record<string, unknown>;
  /** The answer: the saved row, or the stored copy in the 409's details.current. */
  present: (r: R) => Out;
}

/**
 * Save an edit of a draft on its revision: the edited columns with revision + 1, updatedById and updatedAt. 409 when
 * the stored draft is no longer a draft or has moved on to another revision.
 */
export function saveDraftRevision<T extends DraftTable, R extends { state: string; revision: number }, Out>(db: Db, table: T, save: DraftSave<R, Out>): Out {
  const { id, revision } = save;
  const changed = db.transaction((tx) => {
    const r = save.row(id, tx);
    if (r.state !== 'draft' || r.revision !== revision) return false;
    const set = { ...save.edits(r), revision: r.revision + 1, updatedById: save.actorId, updatedAt: new Date() } as SQLiteUpdateSetSource<T>;
    return (
      tx
        .update(table)
        .set(set)
        .where(and(eq(table.id, id), eq(table.revision, revision), eq(table.state, 'draft')))
        .run().changes === 1
    );
  });
  const after = save.row(id, db);
  if (!changed) {
    const why =
      after.state !== 'draft'
        ? `The ${save.noun} is ${after.state.replace('_', ' ')}, not a draft`
        : `The draft was saved meanwhile (revision ${after.revision}, you edited ${revision})`;
    throw conflict(why, { current: save.present(after) });
  }
  return save.present(after);
}
