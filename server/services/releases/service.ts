// Press releases: created from an approved bulletin version (figures copied from its frozen snapshot, never live),
// edited with autosave revisions, reviewed (the reviewer is not the author; approval locks the wording as a version
// with the SHA-256 of its canonical JSON), scheduled in UTC (embargoed until then), rescheduled, taken off the
// schedule, cancelled, and published exactly once by the scheduler (scheduler.ts) with the press-list e-mail written
// to the outbox in the same transaction. No Express here. Every state change is one synchronous better-sqlite3
// transaction whose write is conditional on the state read, so two servers on one database cannot both publish.
import { and, asc, desc, eq, inArray, isNotNull, lte, type SQL } from 'drizzle-orm';
import { bulletinDocumentSchema, type BulletinDocument } from '../../../shared/bulletins/document';
import { plainLanguageFor } from '../../../shared/releases/plainLanguage';
import {
  availableReleaseActions,
  findReleaseTransition,
  releaseGuardFailure,
  type ReleaseAction,
  type ReleaseState,
  type ReleaseTransition,
} from '../../../shared/releases/workflow';
import type { FigureSnapshot, VersionContent } from '../../../shared/schemas/bulletins';
import type {
  Release,
  ReleaseEvent,
  ReleaseListResponse,
  ReleaseSource,
  ReleaseSummary,
  ReleaseVersion,
} from '../../../shared/schemas/releases';
import type { Db } from '../../db/client';
import { bulletins, bulletinVersions, releaseEvents, releases, releaseVersions, stakeholderLists, stakeholderMembers, trackedObjects, users, type ReleaseRow } from '../../db/schema';
import { subject } from '@casl/ability';
import { defineAbilityFor } from '../../../shared/abilities';
import { conflict, forbidden, notFound, unprocessable } from '../../errors';
import { canonicalJson, sha256Hex } from '../bulletins/canonical';
import type { Actor } from '../bulletins/service';
import { eventOut, eventRows, newestFirst, saveDraftRevision, userRef, type Reader, type Tx } from '../drafts';
import type { MailService } from '../mail';
import { initialReleaseDocument, releaseDocumentProblems } from './document';
import { pressMail } from './pressMail';

const iso = (d: Date) => d.toISOString();

/** Release numbers: "REL-0001" from the row id (unique, never reused). */
export function releaseNumber(id: number): string {
  return `REL-${String(id).padStart(4, '0')}`;
}

/** The public address slug: "rel-0001-close-approach-in-september-2034". */
export function releaseSlug(number: string, title: string): string {
  const words = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/g, '');
  return words ? `${number.toLowerCase()}-${words}` : number.toLowerCase();
}

/** "HSO-26-N4: chance of impact about 1 in 12,000." (the odds without the interval and the chance of missing). */
export function initialSummary(designation: string, statements: readonly { quantity: string; text: string }[]): string {
  const ip = statements.find((s) => s.quantity === 'impactProbability');
  if (!ip) return '';
  const odds = ip.text.replace(/( \(|, that is).*$/, '');
  return `${designation}: chance of impact ${odds}.`;
}

/** What a locked version holds (hashed as canonical JSON). */
type ReleaseVersionContent = Omit<ReleaseVersion, 'sha256'>;

export interface PublishResult {
  id: number;
  slug: string;
  lateByMs: number;
  onStart: boolean;
  outboxIds: number[];
}

export interface ReleaseServiceOptions {
  /** Base URL of the public site (links in the press e-mail). */
  publicUrl: string;
  /** Office name (e-mail signature, feed author). */
  officeName: () => string;
}

export function createReleaseService(db: Db, mail: MailService, options: ReleaseServiceOptions) {
  const scheduleListeners = new Set<() => void>();
  const notifySchedule = () => {
    for (const l of scheduleListeners) l();
  };

  function row(id: number, reader: Reader = db): ReleaseRow {
    const r = reader.select().from(releases).where(eq(releases.id, id)).get();
    if (!r) throw notFound('No such release');
    return r;
  }

  function source(r: ReleaseRow, reader: Reader = db): ReleaseSource {
    const b = reader.select({ number: bulletins.number }).from(bulletins).where(eq(bulletins.id, r.bulletinId)).get();
    const o = reader.select({ d: trackedObjects.designation }).from(trackedObjects).where(eq(trackedObjects.id, r.objectId)).get();
    return { bulletinId: r.bulletinId, bulletinNumber: b?.number ?? '', version: r.bulletinVersion, sha256: r.bulletinSha256, objectId: r.objectId, objectDesignation: o?.d ?? '' };
  }

  function summary(r: ReleaseRow, reader: Reader = db): ReleaseSummary {
    return {
      id: r.id,
      number: r.number,
      title: r.title,
      summary: r.summary,
      state: r.state,
      revision: r.revision,
      draftVersion: r.draftVersion,
      latestVersion: r.latestVersion,
      source: source(r, reader),
      publication: {
        publishAt: r.publishAt ? iso(r.publishAt) : null,
        timeZone: r.publishTimeZone,
        publishedAt: r.publishedAt ? iso(r.publishedAt) : null,
        lateByMs: r.lateByMs,
        publishedOnStart: r.publishedOnStart,
        slug: r.slug,
      },
      author: userRef(reader, r.authorId),
      createdAt: iso(r.createdAt),
      updatedAt: iso(r.updatedAt),
    };
  }

  function events(releaseId: number, reader: Reader = db): ReleaseEvent[] {
    return eventRows(reader, releaseEvents, releaseEvents.releaseId, releaseId).map(({ e, actorName }) => ({ ...eventOut(e, actorName), publishAt: e.publishAt ? iso(e.publishAt) : null }));
  }

  function figuresOf(r: ReleaseRow): FigureSnapshot[] {
    return JSON.parse(r.figuresJson) as FigureSnapshot[];
  }

  function detail(r: ReleaseRow, actor: Actor, reader: Reader = db): Release {
    const figures = figuresOf(r);
    return {
      ...summary(r, reader),
      document: JSON.parse(r.documentJson) as BulletinDocument,
      figures,
      plainLanguage: plainLanguageFor(figures),
      allowedActions: r.authorId === null ? [] : availableReleaseActions(r.state, actor.role, actor.id, r.authorId),
      events: events(r.id, reader),
      updatedBy: userRef(reader, r.updatedById),
    };
  }

  function addEvent(
    tx: Tx,
    e: { releaseId: number; action: string; fromState: ReleaseState | null; toState: ReleaseState | null; version: number | null; actorId: number | null; comment?: string | null; publishAt?: Date | null; detail?: unknown },
  ) {
    tx.insert(releaseEvents)
      .values({
        releaseId: e.releaseId,
        action: e.action,
        fromState: e.fromState,
        toState: e.toState,
        version: e.version,
        actorId: e.actorId,
        comment: e.comment ?? null,
        publishAt: e.publishAt ?? null,
        detailJson: e.detail === undefined ? null : JSON.stringify(e.detail),
      })
      .run();
  }

  function versionRow(releaseId: number, version: number, reader: Reader = db) {
    const v = reader
      .select()
      .from(releaseVersions)
      .where(and(eq(releaseVersions.releaseId, releaseId), eq(releaseVersions.version, version)))
      .get();
    if (!v) throw notFound(`Release ${releaseId} has no version ${version}`);
    return v;
  }

  /** A release the actor may not read answers as if it did not exist (404), so its existence is not disclosed. */
  function readable(r: ReleaseRow, actor: Actor): ReleaseRow {
    if (!defineAbilityFor(actor).can('read', subject('Release', { state: r.state }))) throw notFound('No such release');
    return r;
  }

  function lockedVersion(releaseId: number, version: number, reader: Reader = db): ReleaseVersion {
    const v = versionRow(releaseId, version, reader);
    return { ...(JSON.parse(v.contentJson) as ReleaseVersionContent), sha256: v.sha256 };
  }

  function transitionFor(r: ReleaseRow, action: ReleaseAction, actor: Actor): ReleaseTransition {
    if (action === 'publish') throw forbidden('Releases are published by the scheduler at their time; schedule it instead');
    const t = findReleaseTransition(r.state, action);
    if (!t) throw conflict(`A release that is ${r.state.replace('_', ' ')} cannot be sent "${action}"`, { state: r.state, action });
    if (!t.roles.includes(actor.role)) throw forbidden(`The ${actor.role} role cannot ${action.replace('_', ' ')} a release`);
    return t;
  }

  /** Whether the bulletin version the figures were copied from has been withdrawn. */
  function sourceWithdrawn(r: ReleaseRow, reader: Reader): boolean {
    const v = reader
      .select({ status: bulletinVersions.status })
      .from(bulletinVersions)
      .where(and(eq(bulletinVersions.bulletinId, r.bulletinId), eq(bulletinVersions.version, r.bulletinVersion)))
      .get();
    return v?.status === 'withdrawn';
  }

  function checkDocument(doc: BulletinDocument, figures: readonly FigureSnapshot[]): void {
    const problems = releaseDocumentProblems(doc, figures);
    if (problems.length) throw unprocessable(problems[0], { issues: problems.map((message) => ({ in: 'body', path: 'document', message })) });
  }

  /** Press-list recipients (every member of every list of kind 'press'), one per address. */
  function pressRecipients(reader: Reader): { email: string; name: string }[] {
    const rows = reader
      .select({ email: stakeholderMembers.email, name: stakeholderMembers.name, userEmail: users.email, userName: users.name, active: users.active })
      .from(stakeholderMembers)
      .innerJoin(stakeholderLists, eq(stakeholderLists.id, stakeholderMembers.listId))
      .leftJoin(users, eq(users.id, stakeholderMembers.userId))
      .where(eq(stakeholderLists.kind, 'press'))
      .orderBy(asc(stakeholderMembers.id))
      .all();
    const seen = new Map<string, { email: string; name: string }>();
    for (const r of rows) {
      const email = (r.userEmail ?? r.email ?? '').trim().toLowerCase();
      if (!email || r.active === false) continue;
      if (!seen.has(email)) seen.set(email, { email, name: r.userName ?? r.name ?? email });
    }
    return [...seen.values()];
  }

  /**
   * Publish one release if it is scheduled and due at `nowMs`: the conditional UPDATE scheduled -> published
   * (WHERE state = 'scheduled' AND publish_at = the time read) makes this happen once, whoever calls it and however
   * often; the press e-mails go into the outbox in the same transaction. Returns null when nothing was published.
   */
  function publishOne(id: number, nowMs: number, onStart: boolean): PublishResult | null {
    const result = db.transaction((tx) => {
      const r = tx.select().from(releases).where(eq(releases.id, id)).get();
      if (!r || r.state !== 'scheduled' || !r.publishAt || r.publishAt.getTime() > nowMs || r.latestVersion === null) return null;
      if (sourceWithdrawn(r, tx)) {
        // The figures were withdrawn by the office after scheduling: the release must not go out.
        const n = tx
          .update(releases)
          .set({ state: 'cancelled', publishAt: null, updatedAt: new Date(nowMs) })
          .where(and(eq(releases.id, r.id), eq(releases.state, 'scheduled'), eq(releases.publishAt, r.publishAt)))
          .run().changes;
        if (n === 1)
          addEvent(tx, { releaseId: r.id, action: 'cancel', fromState: 'scheduled', toState: 'cancelled', version: r.latestVersion, actorId: null, publishAt: r.publishAt, comment: `Not published: version ${r.bulletinVersion} of the bulletin was withdrawn` });
        return null;
      }
      const locked = lockedVersion(r.id, r.latestVersion, tx);
      const slug = releaseSlug(r.number, locked.title);
      const lateByMs = Math.max(0, Math.round(nowMs - r.publishAt.getTime()));
      const now = new Date(nowMs);
      const n = tx
        .update(releases)
        .set({ state: 'published', publishedAt: now, publishedVersion: r.latestVersion, lateByMs, publishedOnStart: onStart, slug, updatedAt: now })
        .where(and(eq(releases.id, r.id), eq(releases.state, 'scheduled'), eq(releases.publishAt, r.publishAt)))
        .run().changes;
      if (n !== 1) return null;
      const outboxIds = pressRecipients(tx).map((to) => mail.enqueue(pressMail({ to, release: locked, slug, publishedAt: now, publicUrl: options.publicUrl, officeName: options.officeName() }), tx));
      addEvent(tx, {
        releaseId: r.id,
        action: 'publish',
        fromState: 'scheduled',
        toState: 'published',
        version: r.latestVersion,
        actorId: null,
        publishAt: r.publishAt,
        comment: onStart ? `Published on start, ${Math.round(lateByMs / 1000)} s after its time (the server was not running then)` : null,
        detail: { lateByMs, onStart, outboxIds },
      });
      return { id: r.id, slug, lateByMs, onStart, outboxIds };
    });
    if (result && result.outboxIds.length) void mail.deliver(result.outboxIds).catch(() => undefined);
    return result;
  }

  return {
    /** Called when a publication time is set or removed (the scheduler re-arms its timer). Returns an unsubscribe. */
    onScheduleChange(listener: () => void): () => void {
      scheduleListeners.add(listener);
      return () => scheduleListeners.delete(listener);
    },

    /** The releases the actor may read (shared/abilities.ts: liaisons only from approval on), newest first. */
    list(query: { state?: ReleaseState }, actor: Actor): ReleaseListResponse {
      const where: SQL[] = [];
      if (query.state !== undefined) where.push(eq(releases.state, query.state));
      const ability = defineAbilityFor(actor);
      return { releases: newestFirst(db, releases, where).filter((r) => ability.can('read', subject('Release', { state: r.state }))).map((r) => summary(r)) };
    },

    get(id: number, actor: Actor): Release {
      return detail(readable(row(id), actor), actor);
    },

    create(body: { bulletinId: number; version: number; title?: string }, actor: Actor): Release {
      const v = db
        .select()
        .from(bulletinVersions)
        .where(and(eq(bulletinVersions.bulletinId, body.bulletinId), eq(bulletinVersions.version, body.version)))
        .get();
      if (!v) throw unprocessable(`Bulletin ${body.bulletinId} has no version ${body.version}`, { issues: [{ in: 'body', path: 'version', message: 'no such version' }] });
      if (v.status !== 'approved' && v.status !== 'distributed')
        throw unprocessable(`Version ${body.version} of the bulletin is ${v.status}: a release starts from an approved (or distributed) version`, { status: v.status });
      const content = JSON.parse(v.contentJson) as VersionContent;
      // A copy of the frozen snapshot: the release keeps these values whatever happens to runs or later versions.
      const figures: FigureSnapshot[] = JSON.parse(JSON.stringify(content.figures));
      const plain = plainLanguageFor(figures);
      const document = initialReleaseDocument(content.objectDesignation, figures, plain);
      const id = db.transaction((tx) => {
        const inserted = tx
          .insert(releases)
          .values({
            number: `tmp-${Date.now()}-${Math.random()}`,
            bulletinId: body.bulletinId,
            bulletinVersion: body.version,
            bulletinSha256: v.sha256,
            objectId: content.objectId,
            title: body.title ?? content.title,
            summary: initialSummary(content.objectDesignation, plain.statements),
            documentJson: JSON.stringify(document),
            figuresJson: JSON.stringify(figures),
            authorId: actor.id,
            updatedById: actor.id,
          })
          .returning({ id: releases.id })
          .get();
        tx.update(releases).set({ number: releaseNumber(inserted.id) }).where(eq(releases.id, inserted.id)).run();
        addEvent(tx, { releaseId: inserted.id, action: 'create', fromState: null, toState: 'draft', version: 1, actorId: actor.id, detail: { bulletinId: body.bulletinId, bulletinVersion: body.version, sha256: v.sha256 } });
        return inserted.id;
      });
      return detail(row(id), actor);
    },

    /** Autosave of the wording (draft only); 409 with the stored copy when `revision` is not current. */
    update(id: number, body: { revision: number; title?: string; summary?: string; document?: BulletinDocument }, actor: Actor): Release {
      const current = row(id);
      const document = body.document ? bulletinDocumentSchema.parse(body.document) : undefined;
      if (document) checkDocument(document, figuresOf(current));
      return saveDraftRevision(db, releases, {
        id,
        revision: body.revision,
        noun: 'release',
        actorId: actor.id,
        row,
        edits: (r) => ({
          documentJson: document ? JSON.stringify(document) : r.documentJson,
          title: body.title ?? r.title,
          summary: body.summary ?? r.summary,
        }),
        present: (r) => detail(r, actor),
      });
    },

    /** Every user action of the workflow table (schedule/reschedule with publishAt, cancel with a comment). */
    transition(id: number, body: { action: ReleaseAction; comment?: string; publishAt?: string; timeZone?: string; revision?: number }, actor: Actor, nowMs = Date.now()): Release {
      const changedSchedule = db.transaction((tx) => {
        const r = row(id, tx);
        const t = transitionFor(r, body.action, actor);
        if (body.revision !== undefined && body.revision !== r.revision) throw conflict(`The release changed meanwhile (revision ${r.revision})`, { revision: r.revision });
        if (t.commentRequired && !(body.comment ?? '').trim()) throw unprocessable('A comment is required for this action', { issues: [{ in: 'body', path: 'comment', message: 'required' }] });
        for (const g of t.guards) {
          const failure = releaseGuardFailure(g, { actorId: actor.id, authorId: r.authorId ?? -1, publishAt: body.publishAt ?? null, nowMs });
          if (failure === null) continue;
          if (g === 'author' || g === 'notAuthor') throw forbidden(failure);
          throw unprocessable(failure, { guard: g, issues: [{ in: 'body', path: 'publishAt', message: failure }] });
        }
        if ((t.action === 'approve' || t.action === 'schedule' || t.action === 'reschedule') && sourceWithdrawn(r, tx))
          throw unprocessable(`Version ${r.bulletinVersion} of the bulletin was withdrawn: its figures cannot be published`, { guard: 'source' });
        const now = new Date(nowMs);
        const set: Partial<typeof releases.$inferInsert> = { state: t.to, updatedAt: now, updatedById: actor.id };
        let version: number | null = ['draft', 'in_review', 'changes_requested'].includes(r.state) ? r.draftVersion : r.latestVersion;
        let publishAt: Date | null = null;
        let lock: { json: string; sha: string } | null = null;

        if (t.action === 'submit') {
          checkDocument(JSON.parse(r.documentJson) as BulletinDocument, figuresOf(r));
        }
        if (t.action === 'approve') {
          const figures = figuresOf(r);
          const content: ReleaseVersionContent = {
            releaseId: r.id,
            number: r.number,
            version: r.draftVersion,
            title: r.title,
            summary: r.summary,
            document: JSON.parse(r.documentJson) as BulletinDocument,
            figures,
            plainLanguage: plainLanguageFor(figures),
            source: source(r, tx),
            author: userRef(tx, r.authorId),
            reviewer: { id: actor.id, name: actor.name },
            approvedAt: now.toISOString(),
          };
          const json = canonicalJson(content);
          lock = { json, sha: sha256Hex(json) };
          set.latestVersion = r.draftVersion;
          version = r.draftVersion;
        }
        if (t.action === 'amend') {
          set.draftVersion = r.latestVersion! + 1;
          set.revision = r.revision + 1;
          set.authorId = actor.id;
          version = r.latestVersion! + 1;
        }
        if (t.action === 'schedule' || t.action === 'reschedule') {
          publishAt = new Date(Date.parse(body.publishAt!));
          set.publishAt = publishAt;
          set.publishTimeZone = body.timeZone ?? null;
        }
        if (t.action === 'unschedule' || t.action === 'cancel') {
          set.publishAt = null;
        }
        const n = tx
          .update(releases)
          .set(set)
          .where(and(eq(releases.id, r.id), eq(releases.state, r.state), eq(releases.revision, r.revision)))
          .run().changes;
        if (n !== 1) throw conflict('The release changed meanwhile; reload it');
        if (lock) {
          tx.insert(releaseVersions).values({ releaseId: r.id, version: r.draftVersion, contentJson: lock.json, sha256: lock.sha, reviewerId: actor.id, createdAt: now }).run();
        }
        addEvent(tx, {
          releaseId: r.id,
          action: t.action,
          fromState: r.state,
          toState: t.to,
          version,
          actorId: actor.id,
          comment: body.comment?.trim() || null,
          publishAt,
          detail: lock ? { sha256: lock.sha } : body.timeZone ? { timeZone: body.timeZone } : undefined,
        });
        return t.action === 'schedule' || t.action === 'reschedule' || t.action === 'unschedule' || (t.action === 'cancel' && r.state === 'scheduled');
      });
      if (changedSchedule) notifySchedule();
      return detail(row(id), actor);
    },

    lockedVersion,
    /** A locked version, for an actor who may read the release (404 otherwise). */
    readableVersion(id: number, version: number, actor: Actor): ReleaseVersion {
      readable(row(id), actor);
      return lockedVersion(id, version);
    },

    /** The earliest publication time among scheduled releases (ms), or null. */
    nextPublishAtMs(): number | null {
      const r = db
        .select({ t: releases.publishAt })
        .from(releases)
        .where(and(eq(releases.state, 'scheduled'), isNotNull(releases.publishAt)))
        .orderBy(asc(releases.publishAt))
        .limit(1)
        .get();
      return r?.t ? r.t.getTime() : null;
    },

    /** Publish every scheduled release that is due at `nowMs` (each exactly once). */
    publishDue(nowMs: number, onStart = false): PublishResult[] {
      const due = db
        .select({ id: releases.id })
        .from(releases)
        .where(and(eq(releases.state, 'scheduled'), lte(releases.publishAt, new Date(nowMs))))
        .orderBy(asc(releases.publishAt), asc(releases.id))
        .all();
      const out: PublishResult[] = [];
      for (const { id } of due) {
        const r = publishOne(id, nowMs, onStart);
        if (r) out.push(r);
      }
      return out;
    },

    /** Published releases (for the public site), newest publication first. */
    published(): { row: ReleaseRow; version: ReleaseVersion }[] {
      return db
        .select()
        .from(releases)
        .where(and(eq(releases.state, 'published'), isNotNull(releases.slug), isNotNull(releases.publishedVersion)))
        .orderBy(desc(releases.publishedAt), desc(releases.id))
        .all()
        .map((r) => ({ row: r, version: lockedVersion(r.id, r.publishedVersion!) }));
    },

    /** One published release by its slug, or null (anything not published is null). */
    publishedBySlug(slug: string): { row: ReleaseRow; version: ReleaseVersion } | null {
      const r = db
        .select()
        .from(releases)
        .where(and(eq(releases.slug, slug), eq(releases.state, 'published')))
        .get();
      if (!r || r.publishedVersion === null) return null;
      return { row: r, version: lockedVersion(r.id, r.publishedVersion) };
    },

    /** Releases by id (tests, seed). */
    ids(states: readonly ReleaseState[]): number[] {
      return db.select({ id: releases.id }).from(releases).where(inArray(releases.state, [...states])).all().map((r) => r.id);
    },
  };
}
export type ReleaseService = ReturnType<typeof createReleaseService>;
