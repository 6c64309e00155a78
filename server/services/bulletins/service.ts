// Bulletins: drafts with autosave revisions, the workflow (shared/bulletins/workflow.ts) enforced, locked versions
// with figure snapshots and the SHA-256 of their canonical JSON, version history with differences, the PDF.
// No Express here. Every change is one synchronous better-sqlite3 transaction whose write is conditional on the
// state (and revision) that was read, so concurrent requests cannot both succeed (e.g. two approvals make one
// version: the second finds the state changed and gets 409).
import { and, asc, eq, inArray, type SQL } from 'drizzle-orm';
import { bulletinDocumentSchema, EMPTY_DOCUMENT, linkedFigures, referencedRunIds, type BulletinDocument } from '../../../shared/bulletins/document';
import {
  availableActions,
  findTransition,
  guardFailure,
  type BulletinAction,
  type BulletinState,
  type GuardContext,
  type Transition,
} from '../../../shared/bulletins/workflow';
import type { Role } from '../../../shared/roles';
import {
  bulletinListQuerySchema,
  type Bulletin,
  type BulletinEvent,
  type BulletinListResponse,
  type BulletinSummary,
  type BulletinVersion,
  type BulletinVersionDetail,
  type ConfirmedFigure,
  type VersionContent,
  type VersionListResponse,
} from '../../../shared/schemas/bulletins';
import type { z } from 'zod';
import type { Db } from '../../db/client';
import { assessmentRuns, bulletinEvents, bulletins, bulletinVersions, staleFigureConfirmations, trackedObjects, type BulletinRow, type BulletinVersionRow } from '../../db/schema';
import { conflict, forbidden, HttpError, notFound, unprocessable } from '../../errors';
import { canonicalJson, sha256Hex } from './canonical';
import { eventOut, eventRows, newestFirst, saveDraftRevision, userRef, type Reader, type Tx } from '../drafts';
import { diffVersions } from './diff';
import { figureStatuses, loadRuns, snapshotFigures } from './runFigures';

export interface Actor {
  id: number;
  role: Role;
  name: string;
}

const iso = (d: Date) => d.toISOString();

/** Bulletin numbers: "BUL-0001" from the row id (unique, never reused). */
export function bulletinNumber(id: number): string {
  return `BUL-${String(id).padStart(4, '0')}`;
}

/** Which runs a document may refer to: existing runs of the bulletin's object (422 naming the first that is not). */
function checkRunsBelong(db: Reader, objectId: number, document: BulletinDocument): void {
  const ids = referencedRunIds(document);
  if (ids.length === 0) return;
  const rows = db.select({ id: assessmentRuns.id, objectId: assessmentRuns.objectId }).from(assessmentRuns).where(inArray(assessmentRuns.id, ids)).all();
  const found = new Map(rows.map((r) => [r.id, r.objectId]));
  for (const id of ids) {
    if (!found.has(id)) throw unprocessable(`Run ${id} does not exist`, { issues: [{ in: 'body', path: 'document', message: `run ${id} does not exist` }] });
    if (found.get(id) !== objectId) throw unprocessable(`Run ${id} is a run of another object`, { issues: [{ in: 'body', path: 'document', message: `run ${id} is a run of another object` }] });
  }
}

export function createBulletinService(db: Db) {
  function row(id: number, reader: Reader = db): BulletinRow {
    const r = reader.select().from(bulletins).where(eq(bulletins.id, id)).get();
    if (!r) throw notFound('No such bulletin');
    return r;
  }

  function designationOf(objectId: number, reader: Reader = db): string {
    return reader.select({ d: trackedObjects.designation }).from(trackedObjects).where(eq(trackedObjects.id, objectId)).get()?.d ?? '';
  }

  function summary(r: BulletinRow, reader: Reader = db): BulletinSummary {
    return {
      id: r.id,
      number: r.number,
      title: r.title,
      objectId: r.objectId,
      objectDesignation: designationOf(r.objectId, reader),
      state: r.state,
      revision: r.revision,
      draftVersion: r.draftVersion,
      latestVersion: r.latestVersion,
      author: userRef(reader, r.authorId),
      createdAt: iso(r.createdAt),
      updatedAt: iso(r.updatedAt),
    };
  }

  function events(bulletinId: number, reader: Reader = db): BulletinEvent[] {
    return eventRows(reader, bulletinEvents, bulletinEvents.bulletinId, bulletinId).map(({ e, actorName }) => eventOut(e, actorName));
  }

  function detail(r: BulletinRow, actor: Actor, reader: Reader = db): Bulletin {
    const document = JSON.parse(r.documentJson) as BulletinDocument;
    const figures = figureStatuses(reader, r.objectId, document);
    return {
      ...summary(r, reader),
      document,
      figures,
      staleFigureCount: figures.filter((f) => f.stale).length,
      staleReason: r.staleReason,
      allowedActions: r.authorId === null ? [] : availableActions(r.state, actor.role, actor.id, r.authorId),
      events: events(r.id, reader),
      updatedBy: userRef(reader, r.updatedById),
    };
  }

  function addEvent(tx: Tx, e: { bulletinId: number; action: string; fromState: BulletinState | null; toState: BulletinState | null; version: number | null; actorId: number; comment?: string | null; detail?: unknown }) {
    tx.insert(bulletinEvents)
      .values({
        bulletinId: e.bulletinId,
        action: e.action,
        fromState: e.fromState,
        toState: e.toState,
        version: e.version,
        actorId: e.actorId,
        comment: e.comment ?? null,
        detailJson: e.detail === undefined ? null : JSON.stringify(e.detail),
      })
      .run();
  }

  function versionFromRow(v: BulletinVersionRow): BulletinVersion {
    const content = JSON.parse(v.contentJson) as VersionContent;
    return { ...content, status: v.status, sha256: v.sha256, createdAt: iso(v.createdAt) };
  }

  function versionRow(bulletinId: number, version: number, reader: Reader = db): BulletinVersionRow {
    const v = reader
      .select()
      .from(bulletinVersions)
      .where(and(eq(bulletinVersions.bulletinId, bulletinId), eq(bulletinVersions.version, version)))
      .get();
    if (!v) throw notFound(`Bulletin ${bulletinId} has no version ${version}`);
    return v;
  }

  /** Refuse a transition: 409 when the action is not possible from this state, 403 for the role. */
  function transitionFor(r: BulletinRow, action: BulletinAction, actor: Actor): Transition {
    const t = findTransition(r.state, action);
    if (!t) throw conflict(`A bulletin that is ${r.state.replace('_', ' ')} cannot be sent "${action}"`, { state: r.state, action });
    if (!t.roles.includes(actor.role)) throw forbidden(`The ${actor.role} role cannot ${action.replace('_', ' ')} a bulletin`);
    return t;
  }

  function checkGuards(t: Transition, ctx: GuardContext): void {
    for (const g of t.guards) {
      const failure = guardFailure(g, ctx);
      if (failure === null) continue;
      // Who may act is a permission (403); what the request must carry is a content problem (422).
      if (g === 'author' || g === 'notAuthor') throw forbidden(failure);
      throw unprocessable(failure, { guard: g });
    }
  }

  return {
    list(query: z.output<typeof bulletinListQuerySchema>): BulletinListResponse {
      const where: SQL[] = [];
      if (query.objectId !== undefined) where.push(eq(bulletins.objectId, query.objectId));
      if (query.state !== undefined) where.push(eq(bulletins.state, query.state));
      return { bulletins: newestFirst(db, bulletins, where).map((r) => summary(r)) };
    },

    get(id: number, actor: Actor): Bulletin {
      return detail(row(id), actor);
    },

    create(body: { objectId: number; title: string; document?: BulletinDocument }, actor: Actor): Bulletin {
      const object = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.id, body.objectId)).get();
      if (!object) throw unprocessable('No such object', { issues: [{ in: 'body', path: 'objectId', message: 'no such object' }] });
      const document = body.document ?? EMPTY_DOCUMENT;
      checkRunsBelong(db, body.objectId, document);
      const id = db.transaction((tx) => {
        const inserted = tx
          .insert(bulletins)
          .values({ number: `tmp-${Date.now()}-${Math.random()}`, objectId: body.objectId, title: body.title, documentJson: JSON.stringify(document), authorId: actor.id, updatedById: actor.id })
          .returning({ id: bulletins.id })
          .get();
        tx.update(bulletins).set({ number: bulletinNumber(inserted.id) }).where(eq(bulletins.id, inserted.id)).run();
        addEvent(tx, { bulletinId: inserted.id, action: 'create', fromState: null, toState: 'draft', version: 1, actorId: actor.id });
        return inserted.id;
      });
      return detail(row(id), actor);
    },

    /**
     * Autosave. `revision` is the revision the edit was made on: if the stored draft has moved on (another save)
     * or is no longer a draft, 409 with the stored copy in details.current, and nothing is written (the client
     * keeps its own copy, merges and saves again on the current revision).
     */
    update(id: number, body: { revision: number; title?: string; document: BulletinDocument }, actor: Actor): Bulletin {
      const current = row(id);
      const document = bulletinDocumentSchema.parse(body.document);
      checkRunsBelong(db, current.objectId, document);
      return saveDraftRevision(db, bulletins, {
        id,
        revision: body.revision,
        noun: 'bulletin',
        actorId: actor.id,
        row,
        edits: (r) => ({ documentJson: JSON.stringify(document), title: body.title ?? r.title }),
        present: (r) => detail(r, actor),
      });
    },

    transition(id: number, body: { action: BulletinAction; comment?: string; confirmedFigures?: ConfirmedFigure[]; staleReason?: string; revision?: number }, actor: Actor): Bulletin {
      if (body.action === 'distribute') throw unprocessable('Distribute through POST /api/distributions (with the version and the stakeholder list)');
      const result = db.transaction((tx) => {
        const r = row(id, tx);
        const t = transitionFor(r, body.action, actor);
        if (body.revision !== undefined && body.revision !== r.revision) throw conflict(`The draft changed meanwhile (revision ${r.revision})`, { revision: r.revision });
        if (t.commentRequired && !(body.comment ?? '').trim()) throw unprocessable('A comment is required for this action', { issues: [{ in: 'body', path: 'comment', message: 'required' }] });
        const document = JSON.parse(r.documentJson) as BulletinDocument;
        const needsFigures = t.guards.includes('staleReason') || t.guards.includes('allFigures');
        const statuses = needsFigures ? figureStatuses(tx, r.objectId, document) : [];
        const stale = statuses.filter((f) => f.stale);
        const confirmed = body.confirmedFigures ?? [];
        // A confirmation counts only when it names the figure as it is (same run and quantity at that index).
        const figures = linkedFigures(document);
        const validConfirmed = confirmed.filter((c) => figures[c.index] && figures[c.index].attrs.runId === c.runId && figures[c.index].attrs.quantity === c.quantity).map((c) => c.index);
        checkGuards(t, {
          actorId: actor.id,
          authorId: r.authorId ?? -1,
          staleFigureCount: stale.length,
          staleReason: body.staleReason,
          figureCount: figures.length,
          confirmedFigureIndices: validConfirmed,
        });

        const now = new Date();
        const set: Partial<typeof bulletins.$inferInsert> = { state: t.to, updatedAt: now };
        let version: number | null = r.state === 'draft' || r.state === 'in_review' || r.state === 'changes_requested' ? r.draftVersion : r.latestVersion;

        if (t.action === 'submit') {
          set.staleReason = stale.length ? body.staleReason!.trim() : null;
          if (stale.length) {
            tx.insert(staleFigureConfirmations)
              .values({
                bulletinId: r.id,
                draftVersion: r.draftVersion,
                revision: r.revision,
                reason: body.staleReason!.trim(),
                figuresJson: JSON.stringify(stale.map((f) => ({ index: f.index, runId: f.attrs.runId, latestRunId: f.latestRunId, quantity: f.attrs.quantity }))),
                userId: actor.id,
              })
              .run();
          }
        }

        let contentToLock: { content: VersionContent; json: string; sha: string } | null = null;
        if (t.action === 'approve') {
          const { snapshots, problems } = snapshotFigures(statuses);
          if (problems.length) throw unprocessable(`Some figures have no value: ${problems.join('; ')}`, { problems });
          const content: VersionContent = {
            bulletinId: r.id,
            number: r.number,
            version: r.draftVersion,
            title: r.title,
            objectId: r.objectId,
            objectDesignation: designationOf(r.objectId, tx),
            document,
            figures: snapshots,
            runIds: referencedRunIds(document),
            author: userRef(tx, r.authorId),
            signOff: {
              reviewer: { id: actor.id, name: actor.name },
              comment: body.comment?.trim() || null,
              confirmedFigures: confirmed.filter((c) => validConfirmed.includes(c.index)).sort((a, b) => a.index - b.index),
              approvedAt: now.toISOString(),
            },
            staleReason: r.staleReason,
          };
          const json = canonicalJson(content);
          contentToLock = { content, json, sha: sha256Hex(json) };
          set.latestVersion = r.draftVersion;
          version = r.draftVersion;
        }
        if (t.action === 'amend') {
          const latest = versionFromRow(versionRow(r.id, r.latestVersion!, tx));
          set.draftVersion = r.latestVersion! + 1;
          set.documentJson = JSON.stringify(latest.document);
          set.title = latest.title;
          set.revision = r.revision + 1;
          set.authorId = actor.id;
          set.updatedById = actor.id;
          set.staleReason = null;
          version = r.latestVersion! + 1;
        }

        // The conditional write: only from the state (and revision) read above.
        const n = tx
          .update(bulletins)
          .set(set)
          .where(and(eq(bulletins.id, r.id), eq(bulletins.state, r.state), eq(bulletins.revision, r.revision)))
          .run().changes;
        if (n !== 1) throw conflict('The bulletin changed meanwhile; reload it');

        if (contentToLock) {
          // Older approved or distributed versions are superseded by the new one.
          tx.update(bulletinVersions)
            .set({ status: 'superseded' })
            .where(and(eq(bulletinVersions.bulletinId, r.id), inArray(bulletinVersions.status, ['approved', 'distributed'])))
            .run();
          tx.insert(bulletinVersions)
            .values({
              bulletinId: r.id,
              version: contentToLock.content.version,
              status: 'approved',
              title: r.title,
              contentJson: contentToLock.json,
              sha256: contentToLock.sha,
              authorId: r.authorId,
              reviewerId: actor.id,
              createdAt: now,
            })
            .run();
        }
        if (t.action === 'withdraw' && (r.state === 'approved' || r.state === 'distributed') && r.latestVersion !== null) {
          tx.update(bulletinVersions)
            .set({ status: 'withdrawn' })
            .where(and(eq(bulletinVersions.bulletinId, r.id), eq(bulletinVersions.version, r.latestVersion)))
            .run();
        }
        addEvent(tx, {
          bulletinId: r.id,
          action: t.action,
          fromState: r.state,
          toState: t.to,
          version,
          actorId: actor.id,
          comment: body.comment?.trim() || (t.action === 'submit' && stale.length ? body.staleReason!.trim() : null),
          detail:
            t.action === 'approve'
              ? { confirmedFigures: contentToLock!.content.signOff.confirmedFigures, sha256: contentToLock!.sha }
              : t.action === 'submit' && stale.length
                ? { staleReason: body.staleReason!.trim(), staleFigures: stale.map((f) => f.index) }
                : undefined,
        });
        return r.id;
      });
      return detail(row(result), actor);
    },

    versions(id: number): VersionListResponse {
      row(id);
      const rows = db.select().from(bulletinVersions).where(eq(bulletinVersions.bulletinId, id)).orderBy(asc(bulletinVersions.version)).all();
      return {
        versions: rows.map((v) => {
          const content = JSON.parse(v.contentJson) as VersionContent;
          return {
            bulletinId: v.bulletinId,
            version: v.version,
            status: v.status,
            title: v.title,
            author: content.author,
            reviewer: content.signOff.reviewer,
            approvedAt: content.signOff.approvedAt,
            sha256: v.sha256,
          };
        }),
      };
    },

    /** One locked version with its differences from `against` (default: the previous version). */
    version(id: number, version: number, against?: number): BulletinVersionDetail {
      row(id);
      const v = versionFromRow(versionRow(id, version));
      const base = against ?? (version > 1 ? version - 1 : undefined);
      if (base === undefined) return { ...v, diff: null };
      if (base === version) throw new HttpError(400, 'validation', 'Compare with another version', { issues: [{ in: 'query', path: 'against', message: 'same version' }] });
      const older = versionFromRow(versionRow(id, base));
      return { ...v, diff: base < version ? diffVersions(older, v) : diffVersions(v, older) };
    },

    /** The stored version exactly as locked (for the PDF and distribution). */
    lockedVersion(id: number, version: number): BulletinVersion {
      return versionFromRow(versionRow(id, version));
    },

    /** The engine results of the runs a version embeds (risk tables and plots in the PDF). */
    runResults(runIds: readonly number[]): Record<string, { runId: number; result: unknown }> {
      const out: Record<string, { runId: number; result: unknown }> = {};
      for (const [id, r] of loadRuns(db, runIds)) out[String(id)] = { runId: id, result: r.result };
      return out;
    },

    /** Recompute the hash of a stored version from its stored canonical JSON (integrity check). */
    verifyVersion(id: number, version: number): { sha256: string; matches: boolean } {
      const v = versionRow(id, version);
      const again = sha256Hex(canonicalJson(JSON.parse(v.contentJson)));
      return { sha256: v.sha256, matches: again === v.sha256 && sha256Hex(v.contentJson) === v.sha256 };
    },
  };
}
export type BulletinService = ReturnType<typeof createBulletinService>;

