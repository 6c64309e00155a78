// Stakeholder lists, distribution of a locked version (PDF attached, HTML and plain-text summary) through the mail
// outbox, the per-recipient delivery log, and the briefing inbox of users with acknowledgement.
// A distribution is written in one transaction with its recipient rows and their outbox messages (attachments
// included), then delivered; with SMTP down the messages wait in the outbox and go out on a later retry
// (server/services/mail.ts), each at most once by this process and never twice at the same time.
import { and, asc, desc, eq, inArray, isNotNull, isNull } from 'drizzle-orm';
import { documentText, FIGURE_QUANTITY_LABELS } from '../../../shared/bulletins/document';
import { findTransition } from '../../../shared/bulletins/workflow';
import { formatTdbJd, formatUtc } from '../../../shared/format';
import type {
  Briefing,
  BriefingDetail,
  BulletinVersion,
  Distribution,
  Recipient,
  StakeholderList,
  StakeholderListBody,
} from '../../../shared/schemas/bulletins';
import type { z } from 'zod';
import type { stakeholderListBodySchema } from '../../../shared/schemas/bulletins';
import type { Db } from '../../db/client';
import {
  bulletinEvents,
  bulletins,
  bulletinVersions,
  distributionRecipients,
  distributions,
  mailOutbox,
  stakeholderLists,
  stakeholderMembers,
  trackedObjects,
  users,
} from '../../db/schema';
import { conflict, forbidden, notFound, unprocessable } from '../../errors';
import type { MailService } from '../mail';
import { renderBulletinPdf, type BulletinVersionForPdf } from '../pdf';
import { officeName } from '../settings';
import { render } from '../templates';
import type { Actor, BulletinService } from './service';

/** The marking printed on every bulletin PDF and e-mail (one per version, so the PDF stays byte-stable). */
export const DISTRIBUTION_MARKING = 'RESTRICTED – for the named recipients and their offices';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function pdfFileName(v: Pick<BulletinVersion, 'number' | 'version'>): string {
  return `${v.number}-v${v.version}.pdf`;
}

/** One line per figure: "Impact probability (earth, 2034-09-17 …): 1.2e-4 … [run 3]". */
export function figureLines(v: Pick<BulletinVersion, 'figures'>): string {
  if (v.figures.length === 0) return '(no linked figures)';
  return v.figures
    .map((f) => {
      const where = f.value.approach ? ` (${f.value.approach.body}, ${formatTdbJd(f.value.approach.epochTdbJd).slice(0, 10)})` : '';
      return `- ${FIGURE_QUANTITY_LABELS[f.attrs.quantity]}${where}: ${f.value.text} [run ${f.value.runId}]`;
    })
    .join('\n');
}

export function summaryText(v: Pick<BulletinVersion, 'document' | 'figures'>, maxChars = 2000): string {
  const text = documentText(v.document, (index) => v.figures.find((f) => f.index === index)?.value.text ?? '?');
  return text.length > maxChars ? `${text.slice(0, maxChars - 1)}…` : text;
}

export function createDistributionService(db: Db, bulletinService: BulletinService, mail: MailService, publicUrl: string) {
  function listRow(id: number) {
    const l = db.select().from(stakeholderLists).where(eq(stakeholderLists.id, id)).get();
    if (!l) throw notFound('No such stakeholder list');
    return l;
  }

  function listOut(id: number): StakeholderList {
    const l = listRow(id);
    const members = db
      .select({ m: stakeholderMembers, uName: users.name, uEmail: users.email, uRole: users.role })
      .from(stakeholderMembers)
      .leftJoin(users, eq(users.id, stakeholderMembers.userId))
      .where(eq(stakeholderMembers.listId, id))
      .orderBy(asc(stakeholderMembers.id))
      .all()
      .map(({ m, uName, uEmail, uRole }) => ({
        id: m.id,
        userId: m.userId,
        name: m.userId !== null ? (uName ?? '') : (m.name ?? ''),
        email: m.userId !== null ? (uEmail ?? '') : (m.email ?? ''),
        role: m.userId !== null ? (uRole ?? null) : null,
      }));
    return { id: l.id, name: l.name, kind: l.kind, description: l.description, members, createdAt: l.createdAt.toISOString() };
  }

  function writeMembers(tx: Pick<Db, 'insert' | 'select'>, listId: number, members: StakeholderListBody['members']): void {
    const seen = new Set<string>();
    for (const m of members) {
      if ('userId' in m) {
        const u = tx.select({ id: users.id }).from(users).where(eq(users.id, m.userId)).get();
        if (!u) throw unprocessable(`No user ${m.userId}`, { issues: [{ in: 'body', path: 'members', message: `no user ${m.userId}` }] });
        if (seen.has(`u${m.userId}`)) continue;
        seen.add(`u${m.userId}`);
        tx.insert(stakeholderMembers).values({ listId, userId: m.userId }).run();
      } else {
        const email = m.email.trim().toLowerCase();
        if (seen.has(email)) continue;
        seen.add(email);
        tx.insert(stakeholderMembers).values({ listId, email, name: m.name }).run();
      }
    }
  }

  function recipientsOf(distributionId: number): Recipient[] {
    return db
      .select({ r: distributionRecipients, o: mailOutbox })
      .from(distributionRecipients)
      .leftJoin(mailOutbox, eq(mailOutbox.id, distributionRecipients.outboxId))
      .where(eq(distributionRecipients.distributionId, distributionId))
      .orderBy(asc(distributionRecipients.id))
      .all()
      .map(({ r, o }) => ({
        id: r.id,
        userId: r.userId,
        name: r.name,
        email: r.email,
        status: o?.status ?? 'pending',
        attempts: o?.attempts ?? 0,
        lastError: o?.lastError ?? null,
        sentAt: iso(o?.sentAt ?? null),
        acknowledgedAt: iso(r.acknowledgedAt),
        acknowledgeComment: r.acknowledgeComment,
      }));
  }

  function distributionOut(id: number): Distribution {
    const d = db.select().from(distributions).where(eq(distributions.id, id)).get();
    if (!d) throw notFound('No such distribution');
    const b = db.select({ number: bulletins.number }).from(bulletins).where(eq(bulletins.id, d.bulletinId)).get()!;
    const v = db.select({ version: bulletinVersions.version, sha256: bulletinVersions.sha256, title: bulletinVersions.title }).from(bulletinVersions).where(eq(bulletinVersions.id, d.versionId)).get()!;
    const sender = d.sentById !== null ? db.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, d.sentById)).get() : undefined;
    const recipients = recipientsOf(id);
    return {
      id: d.id,
      bulletinId: d.bulletinId,
      bulletinNumber: b.number,
      title: v.title,
      version: v.version,
      sha256: v.sha256,
      list: { id: d.listId, name: d.listName, kind: d.listKind },
      sentBy: sender ?? null,
      createdAt: d.createdAt.toISOString(),
      recipients,
      counts: {
        total: recipients.length,
        sent: recipients.filter((r) => r.status === 'sent').length,
        pending: recipients.filter((r) => r.status === 'pending').length,
        failed: recipients.filter((r) => r.status === 'failed').length,
        acknowledged: recipients.filter((r) => r.acknowledgedAt !== null).length,
      },
    };
  }

  async function pdfOf(v: BulletinVersion): Promise<Buffer> {
    const object = db.select({ name: trackedObjects.name }).from(trackedObjects).where(eq(trackedObjects.id, v.objectId)).get();
    const input: BulletinVersionForPdf = {
      ...v,
      officeName: officeName(db),
      objectName: object?.name ?? null,
      distributionMarking: DISTRIBUTION_MARKING,
      runs: bulletinService.runResults(v.runIds),
    };
    return renderBulletinPdf(input);
  }

  function briefingRow(id: number, actor: Actor) {
    const r = db.select().from(distributionRecipients).where(eq(distributionRecipients.id, id)).get();
    // Someone else's briefing is answered like a missing one (no hint that it exists).
    if (!r || r.userId !== actor.id) throw notFound('No such briefing');
    return r;
  }

  function briefingOut(recipientId: number): Briefing {
    const r = db.select().from(distributionRecipients).where(eq(distributionRecipients.id, recipientId)).get()!;
    const d = distributionOut(r.distributionId);
    const v = bulletinService.lockedVersion(d.bulletinId, d.version);
    return {
      id: r.id,
      distributionId: d.id,
      bulletinId: d.bulletinId,
      bulletinNumber: d.bulletinNumber,
      title: d.title,
      objectDesignation: v.objectDesignation,
      version: d.version,
      sha256: d.sha256,
      sentBy: d.sentBy,
      sentAt: d.createdAt,
      acknowledgedAt: iso(r.acknowledgedAt),
      acknowledgeComment: r.acknowledgeComment,
    };
  }

  return {
    lists(): { lists: StakeholderList[] } {
      const ids = db.select({ id: stakeholderLists.id }).from(stakeholderLists).orderBy(asc(stakeholderLists.name)).all();
      return { lists: ids.map(({ id }) => listOut(id)) };
    },
    getList(id: number): StakeholderList {
      return listOut(id);
    },
    createList(body: z.output<typeof stakeholderListBodySchema>, actor: Actor): StakeholderList {
      if (db.select({ id: stakeholderLists.id }).from(stakeholderLists).where(eq(stakeholderLists.name, body.name)).get()) throw conflict('A list with this name exists');
      const id = db.transaction((tx) => {
        const l = tx.insert(stakeholderLists).values({ name: body.name, kind: body.kind, description: body.description, createdById: actor.id }).returning({ id: stakeholderLists.id }).get();
        writeMembers(tx, l.id, body.members);
        return l.id;
      });
      return listOut(id);
    },
    /** Replace name, kind, description and members (past distributions keep their own recipient rows). */
    updateList(id: number, body: z.output<typeof stakeholderListBodySchema>): StakeholderList {
      listRow(id);
      const clash = db.select({ id: stakeholderLists.id }).from(stakeholderLists).where(eq(stakeholderLists.name, body.name)).get();
      if (clash && clash.id !== id) throw conflict('A list with this name exists');
      db.transaction((tx) => {
        tx.update(stakeholderLists).set({ name: body.name, kind: body.kind, description: body.description }).where(eq(stakeholderLists.id, id)).run();
        tx.delete(stakeholderMembers).where(eq(stakeholderMembers.listId, id)).run();
        writeMembers(tx, id, body.members);
      });
      return listOut(id);
    },

    /** The PDF of a locked version (what is attached to the e-mails). */
    async versionPdf(bulletinId: number, version: number): Promise<{ pdf: Buffer; fileName: string }> {
      const v = bulletinService.lockedVersion(bulletinId, version);
      return { pdf: await pdfOf(v), fileName: pdfFileName(v) };
    },

    async distribute(body: { bulletinId: number; version: number; listId: number }, actor: Actor): Promise<Distribution> {
      const b = db.select().from(bulletins).where(eq(bulletins.id, body.bulletinId)).get();
      if (!b) throw unprocessable('No such bulletin', { issues: [{ in: 'body', path: 'bulletinId', message: 'no such bulletin' }] });
      const t = findTransition(b.state, 'distribute');
      if (!t) throw conflict(`A bulletin that is ${b.state.replace('_', ' ')} cannot be distributed`, { state: b.state });
      if (!t.roles.includes(actor.role)) throw forbidden(`The ${actor.role} role cannot distribute bulletins`);
      if (b.latestVersion !== body.version) throw conflict(`Only the latest approved version (${b.latestVersion}) can be distributed`);
      const list = listOut(body.listId);
      const v = bulletinService.lockedVersion(b.id, body.version);
      if (v.status !== 'approved' && v.status !== 'distributed') throw conflict(`Version ${v.version} is ${v.status}`);
      const vRow = db.select({ id: bulletinVersions.id }).from(bulletinVersions).where(and(eq(bulletinVersions.bulletinId, b.id), eq(bulletinVersions.version, v.version))).get()!;
      if (db.select({ id: distributions.id }).from(distributions).where(and(eq(distributions.versionId, vRow.id), eq(distributions.listId, list.id))).get()) {
        throw conflict(`Version ${v.version} was already sent to "${list.name}"`);
      }
      // Recipients: active users (their current address) and outside addresses, each address once.
      const activeIds = new Set(
        db
          .select({ id: users.id })
          .from(users)
          .where(and(eq(users.active, true), inArray(users.id, [0, ...list.members.filter((m) => m.userId !== null).map((m) => m.userId!)])))
          .all()
          .map((u) => u.id),
      );
      const seen = new Set<string>();
      const recipients = list.members.filter((m) => {
        if (m.userId !== null && !activeIds.has(m.userId)) return false;
        const key = m.email.toLowerCase();
        if (seen.has(key)) return false;
        seen.add(key);
        return true;
      });
      if (recipients.length === 0) throw unprocessable(`The list "${list.name}" has no active members`);

      const pdf = await pdfOf(v);
      const pdfName = pdfFileName(v);
      const office = officeName(db);
      const base = {
        officeName: office,
        marking: DISTRIBUTION_MARKING,
        number: v.number,
        version: String(v.version),
        title: v.title,
        objectDesignation: v.objectDesignation,
        approvedAt: formatUtc(v.signOff.approvedAt),
        reviewerName: v.signOff.reviewer.name,
        figures: figureLines(v),
        summary: summaryText(v),
        pdfName,
        sha256: v.sha256,
      };
      const subject = `[${office}] ${v.number} v${v.version}: ${v.title}`;

      const { distributionId, outboxIds } = db.transaction((tx) => {
        // Conditional on the state read: a withdrawal or a new version in between wins.
        const n = tx
          .update(bulletins)
          .set({ state: 'distributed', updatedAt: new Date() })
          .where(and(eq(bulletins.id, b.id), inArray(bulletins.state, ['approved', 'distributed']), eq(bulletins.latestVersion, v.version)))
          .run().changes;
        if (n !== 1) throw conflict('The bulletin changed meanwhile; reload it');
        const existing = tx.select({ id: distributions.id }).from(distributions).where(and(eq(distributions.versionId, vRow.id), eq(distributions.listId, list.id))).get();
        if (existing) throw conflict(`Version ${v.version} was already sent to "${list.name}"`);
        const d = tx
          .insert(distributions)
          .values({ bulletinId: b.id, versionId: vRow.id, listId: list.id, listName: list.name, listKind: list.kind, sentById: actor.id })
          .returning({ id: distributions.id })
          .get();
        const ids: number[] = [];
        for (const m of recipients) {
          const rec = tx.insert(distributionRecipients).values({ distributionId: d.id, userId: m.userId, email: m.email, name: m.name }).returning({ id: distributionRecipients.id }).get();
          const ackLine =
            m.userId !== null ? `Please acknowledge receipt in your Tocsin briefing inbox: ${publicUrl}/briefings/${rec.id}` : 'Questions: reply to the office that sent this bulletin.';
          const values = { ...base, ackLine };
          const outboxId = mail.enqueue(
            {
              to: m.email,
              subject,
              text: render('email/briefing.txt', values),
              html: render('email/briefing.html', values),
              attachments: [{ filename: pdfName, contentType: 'application/pdf', content: pdf }],
            },
            tx,
          );
          tx.update(distributionRecipients).set({ outboxId }).where(eq(distributionRecipients.id, rec.id)).run();
          ids.push(outboxId);
        }
        tx.update(bulletinVersions).set({ status: 'distributed' }).where(eq(bulletinVersions.id, vRow.id)).run();
        tx.insert(bulletinEvents)
          .values({ bulletinId: b.id, action: 'distribute', fromState: b.state, toState: 'distributed', version: v.version, actorId: actor.id, comment: `Sent to "${list.name}" (${recipients.length} recipients)`, detailJson: JSON.stringify({ distributionId: d.id, listId: list.id }) })
          .run();
        return { distributionId: d.id, outboxIds: ids };
      });
      // Delivery happens after the answer; the outbox keeps whatever cannot go out now.
      void mail.deliver(outboxIds).catch((err) => {
        // The outbox keeps the messages; the periodic pass retries them (a closed database means the app stopped).
        if (db.$client.open) console.warn('[distribution] delivery pass failed:', err);
      });
      return distributionOut(distributionId);
    },

    list(query: { bulletinId?: number }): { distributions: Distribution[] } {
      const rows = db
        .select({ id: distributions.id })
        .from(distributions)
        .where(query.bulletinId !== undefined ? eq(distributions.bulletinId, query.bulletinId) : undefined)
        .orderBy(desc(distributions.id))
        .all();
      return { distributions: rows.map((r) => distributionOut(r.id)) };
    },
    get(id: number): Distribution {
      return distributionOut(id);
    },

    /** The signed-in user's briefings, newest first. */
    briefings(actor: Actor): { briefings: Briefing[] } {
      const rows = db
        .select({ id: distributionRecipients.id })
        .from(distributionRecipients)
        .where(and(eq(distributionRecipients.userId, actor.id), isNotNull(distributionRecipients.userId)))
        .orderBy(desc(distributionRecipients.id))
        .all();
      return { briefings: rows.map((r) => briefingOut(r.id)) };
    },
    briefing(id: number, actor: Actor): BriefingDetail {
      briefingRow(id, actor);
      const b = briefingOut(id);
      const v = bulletinService.lockedVersion(b.bulletinId, b.version);
      return { ...b, summaryText: summaryText(v, 20_000), figures: v.figures, document: v.document, pdfUrl: `/api/briefings/${id}/pdf` };
    },
    async briefingPdf(id: number, actor: Actor): Promise<{ pdf: Buffer; fileName: string }> {
      briefingRow(id, actor);
      const b = briefingOut(id);
      const v = bulletinService.lockedVersion(b.bulletinId, b.version);
      return { pdf: await pdfOf(v), fileName: pdfFileName(v) };
    },
    /** Idempotent: a second acknowledgement keeps the first time and comment. */
    acknowledge(id: number, actor: Actor, comment?: string): Briefing {
      briefingRow(id, actor);
      db.update(distributionRecipients)
        .set({ acknowledgedAt: new Date(), acknowledgeComment: comment?.trim() || null })
        .where(and(eq(distributionRecipients.id, id), eq(distributionRecipients.userId, actor.id), isNull(distributionRecipients.acknowledgedAt)))
        .run();
      return briefingOut(id);
    },
  };
}
export type DistributionService = ReturnType<typeof createDistributionService>;
