// Revisioned drafts (bulletins and press releases): the autosave that writes only on the revision the edit was
// made on. One synchronous better-sqlite3 transaction reads the row and makes a conditional UPDATE (same id, same
// revision, still a draft), so two concurrent saves cannot both succeed; the loser gets 409 with the stored copy
// and nothing is written (the client keeps its own copy, merges and saves again on the current revision).
// Also what both kinds of draft show alike: who (userRef) and their workflow events (eventOut).
import { and, asc, desc, eq, type SQL } from 'drizzle-orm';
import type { AnySQLiteColumn, SQLiteTable, SQLiteUpdateSetSource } from 'drizzle-orm/sqlite-core';
import type { Db } from '../db/client';
import { users } from '../db/schema';
import { conflict } from '../errors';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type Reader = Pick<Db, 'select'>;

/** A user as the API names them: id and name (an empty name when the row is gone), or null for no user. */
export function userRef(db: Reader, id: number | null): { id: number; name: string } | null {
  if (id === null) return null;
  const u = db.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, id)).get();
  return u ?? { id, name: '' };
}

/** The fields every workflow event row has (bulletin_events, release_events). */
export interface EventRow<S> {
  id: number;
  action: string;
  fromState: S | null;
  toState: S | null;
  version: number | null;
  actorId: number | null;
  comment: string | null;
  createdAt: Date;
}

/** The rows of a drafts table meeting every condition in `where`, the most recently updated first. */
export function newestFirst<T extends DraftTable & { updatedAt: AnySQLiteColumn }>(reader: Reader, table: T, where: SQL[]): T['$inferSelect'][] {
  return reader
    .select()
    .from(table as SQLiteTable)
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(table.updatedAt), desc(table.id))
    .all() as T['$inferSelect'][];
}

/** An events table: its rows have an id (in order of writing) and the acting user. */
export type EventTable = SQLiteTable & { id: AnySQLiteColumn; actorId: AnySQLiteColumn };

/** The events of one draft (`ownerColumn` = `ownerId`) in the order written, each with its actor's name. */
export function eventRows<T extends EventTable>(reader: Reader, table: T, ownerColumn: AnySQLiteColumn, ownerId: number): { e: T['$inferSelect']; actorName: string | null }[] {
  return reader
    .select({ e: table as SQLiteTable, actorName: users.name })
    .from(table as SQLiteTable)
    .leftJoin(users, eq(users.id, table.actorId))
    .where(eq(ownerColumn, ownerId))
    .orderBy(asc(table.id))
    .all() as { e: T['$inferSelect']; actorName: string | null }[];
}

/** A workflow event as the API shows it, from its row and its actor's name (from a left join on users). */
export function eventOut<S>(e: EventRow<S>, actorName: string | null) {
  return {
    id: e.id,
    action: e.action,
    fromState: e.fromState,
    toState: e.toState,
    version: e.version,
    actor: e.actorId !== null ? { id: e.actorId, name: actorName ?? '' } : null,
    comment: e.comment,
    createdAt: e.createdAt.toISOString(),
  };
}

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
