// Outgoing e-mail through nodemailer, with an outbox table in front: a message is stored first,
// then sent; failures stay pending and are retried by deliverPending() (called on a timer by
// server/index.ts). Sending is idempotent per row: a row is sent at most once by this process.
import { and, asc, eq, lt } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Db } from '../db/client';
import { mailOutbox } from '../db/schema';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface MailService {
  /** Store the message in the outbox and try to send it now. Resolves with the outbox id; never throws on SMTP errors. */
  send(mail: OutgoingMail): Promise<number>;
  /** Retry everything still pending. */
  deliverPending(): Promise<void>;
}

const MAX_ATTEMPTS = 10;

export function createTransport(smtpUrl: string): Transporter {
  return nodemailer.createTransport(smtpUrl);
}

export function createMailService(db: Db, transport: Transporter, from: string): MailService {
  const inFlight = new Set<number>();

  async function deliver(id: number): Promise<void> {
    if (inFlight.has(id)) return;
    const row = db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).get();
    if (!row || row.status !== 'pending') return;
    inFlight.add(id);
    try {
      await transport.sendMail({ from, to: row.toAddress, subject: row.subject, text: row.text, html: row.html ?? undefined });
      db.update(mailOutbox).set({ status: 'sent', sentAt: new Date(), attempts: row.attempts + 1, lastError: null }).where(eq(mailOutbox.id, id)).run();
    } catch (err) {
      const attempts = row.attempts + 1;
      db.update(mailOutbox)
        .set({ attempts, lastError: String((err as Error)?.message ?? err).slice(0, 500), status: attempts >= MAX_ATTEMPTS ? 'failed' : 'pending' })
        .where(eq(mailOutbox.id, id))
        .run();
      console.warn(`[mail] sending outbox #${id} failed (attempt ${attempts}): ${(err as Error)?.message ?? err}`);
    } finally {
      inFlight.delete(id);
    }
  }

  return {
    async send(mail) {
      const row = db
        .insert(mailOutbox)
        .values({ toAddress: mail.to, subject: mail.subject, text: mail.text, html: mail.html ?? null })
        .returning({ id: mailOutbox.id })
        .get();
      await deliver(row.id);
      return row.id;
    },
    async deliverPending() {
      const pending = db
        .select({ id: mailOutbox.id })
        .from(mailOutbox)
        .where(and(eq(mailOutbox.status, 'pending'), lt(mailOutbox.attempts, MAX_ATTEMPTS)))
        .orderBy(asc(mailOutbox.id))
        .all();
      for (const { id } of pending) await deliver(id);
    },
  };
}
