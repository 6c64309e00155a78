// Outgoing e-mail through nodemailer, with an outbox table in front: a message is stored first (with its
// attachments), then sent; failures stay pending and are retried by deliverPending() (called on a timer by
// server/index.ts) with backoff: the first retry may happen at once, then 30 s, 1, 2, 4 ... min, at most 1 h apart;
// short backoffs (up to 5 min) are also retried by a timer of their own when due (after at least 1 s).
// A row is claimed atomically (conditional UPDATE on `claimed_until`) before it is sent, so two senders (timers,
// processes) never send the same row at the same time, and a row marked sent is never sent again. Every message
// carries a Message-ID derived from its outbox id, so a receiving server can drop a repeat after a crash between
// the SMTP answer and the database write (at-least-once delivery; common practice, no source).
import { and, asc, eq, isNull, lt, lte, or } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Db } from '../db/client';
import { mailAttachments, mailOutbox } from '../db/schema';

export interface MailAttachment {
  filename: string;
  contentType: string;
  content: Buffer;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: MailAttachment[];
}

/** Something that can write rows: the database or a transaction of it. */
export type DbWriter = Pick<Db, 'insert'>;

export interface MailService {
  /** Store the message in the outbox and try to send it now. Resolves with the outbox id; never throws on SMTP errors. */
  send(mail: OutgoingMail): Promise<number>;
  /**
   * Store the message without sending (use inside a transaction with the rows that refer to it; call deliver()
   * after the commit). Returns the outbox id.
   */
  enqueue(mail: OutgoingMail, writer?: DbWriter): number;
  /** Try to send these outbox rows now (rows not pending or claimed elsewhere are skipped). */
  deliver(ids: readonly number[]): Promise<void>;
  /** Retry everything pending whose backoff has passed. */
  deliverPending(): Promise<void>;
}

export const MAX_ATTEMPTS = 16;
/** How long a sender may hold a row before another may take it (an SMTP send with a PDF takes seconds). */
const CLAIM_MS = 2 * 60_000;
/** A failed row is retried by a timer of its own when the backoff is at most this long ... */
const MAX_TIMER_MS = 5 * 60_000;
/** ... and not sooner than this after the failure. */
const MIN_RETRY_MS = 1000;

/** Delay before the next attempt after `attempts` failed attempts: 0, 30 s, 1 min, 2 min, ... capped at 1 h. */
export function retryDelayMs(attempts: number): number {
  if (attempts <= 1) return 0;
  return Math.min(30_000 * 2 ** (attempts - 2), 60 * 60_000);
}

export function createTransport(smtpUrl: string): Transporter {
  return nodemailer.createTransport(smtpUrl);
}

export function createMailService(db: Db, transport: Transporter, from: string): MailService {
  const inFlight = new Set<number>();
  const domain = /@([^>\s]+)/.exec(from)?.[1] ?? 'tocsin.local';

  /** Retry a failed row when its backoff has passed (soon retries only; the periodic deliverPending covers the rest). */
  function scheduleRetry(id: number, delayMs: number): void {
    if (delayMs > MAX_TIMER_MS) return;
    const t = setTimeout(() => {
      deliverOne(id, true).catch(() => undefined);
    }, Math.max(delayMs, MIN_RETRY_MS));
    t.unref();
  }

  async function deliverOne(id: number, dueOnly = false): Promise<void> {
    if (inFlight.has(id)) return;
    const now = Date.now();
    // Atomic claim: only one sender gets the row (and, for a scheduled retry, only once its backoff has passed).
    const conditions = [eq(mailOutbox.id, id), eq(mailOutbox.status, 'pending'), or(isNull(mailOutbox.claimedUntil), lt(mailOutbox.claimedUntil, new Date(now)))];
    if (dueOnly) conditions.push(or(isNull(mailOutbox.nextAttemptAt), lte(mailOutbox.nextAttemptAt, new Date(now))));
    const claimed = db
      .update(mailOutbox)
      .set({ claimedUntil: new Date(now + CLAIM_MS) })
      .where(and(...conditions))
      .run().changes;
    if (claimed !== 1) return;
    const row = db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).get();
    if (!row) return;
    inFlight.add(id);
    try {
      const attachments = db.select().from(mailAttachments).where(eq(mailAttachments.outboxId, id)).orderBy(asc(mailAttachments.id)).all();
      await transport.sendMail({
        from,
        to: row.toAddress,
        subject: row.subject,
        text: row.text,
        html: row.html ?? undefined,
        messageId: `<outbox-${id}@${domain}>`,
        attachments: attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, content: a.content })),
      });
      db.update(mailOutbox).set({ status: 'sent', sentAt: new Date(), attempts: row.attempts + 1, lastError: null, claimedUntil: null, nextAttemptAt: null }).where(eq(mailOutbox.id, id)).run();
    } catch (err) {
      const attempts = row.attempts + 1;
      db.update(mailOutbox)
        .set({
          attempts,
          lastError: String((err as Error)?.message ?? err).slice(0, 500),
          status: attempts >= MAX_ATTEMPTS ? 'failed' : 'pending',
          nextAttemptAt: new Date(Date.now() + retryDelayMs(attempts)),
          claimedUntil: null,
        })
        .where(eq(mailOutbox.id, id))
        .run();
      console.warn(`[mail] sending outbox #${id} failed (attempt ${attempts}): ${(err as Error)?.message ?? err}`);
      if (attempts < MAX_ATTEMPTS) scheduleRetry(id, retryDelayMs(attempts));
    } finally {
      inFlight.delete(id);
    }
  }

  function enqueue(mail: OutgoingMail, writer: DbWriter = db): number {
    const row = writer
      .insert(mailOutbox)
      .values({ toAddress: mail.to, subject: mail.subject, text: mail.text, html: mail.html ?? null })
      .returning({ id: mailOutbox.id })
      .get();
    for (const a of mail.attachments ?? []) {
      writer.insert(mailAttachments).values({ outboxId: row.id, filename: a.filename, contentType: a.contentType, content: a.content }).run();
    }
    return row.id;
  }

  return {
    async send(mail) {
      const id = enqueue(mail);
      await deliverOne(id);
      return id;
    },
    enqueue,
    async deliver(ids) {
      for (const id of ids) await deliverOne(id);
    },
    async deliverPending() {
      const now = new Date();
      const pending = db
        .select({ id: mailOutbox.id })
        .from(mailOutbox)
        .where(and(eq(mailOutbox.status, 'pending'), lt(mailOutbox.attempts, MAX_ATTEMPTS), or(isNull(mailOutbox.nextAttemptAt), lte(mailOutbox.nextAttemptAt, now))))
        .orderBy(asc(mailOutbox.id))
        .all();
      for (const { id } of pending) await deliverOne(id);
    },
  };
}
