// express-session store on Tocsin's own `sessions` table.
// Idle expiry: each request pushes expiresAt to now + idleMs; absolute expiry: never past
// createdAt + absoluteMs (createdAt is the sign-in, because sign-in regenerates the session).
import { eq, lte, sql } from 'drizzle-orm';
import session from 'express-session';
import type { Db } from '../db/client';
import { sessions } from '../db/schema';

declare module 'express-session' {
  interface SessionData {
    userId?: number;
    /** Milliseconds since the epoch of the sign-in. */
    signedInAt?: number;
  }
}

export interface SessionLimits {
  idleMs: number;
  absoluteMs: number;
}

type Callback = (err?: unknown) => void;

export class SqliteSessionStore extends session.Store {
  constructor(
    private readonly db: Db,
    private readonly limits: SessionLimits,
    private readonly now: () => number = Date.now,
  ) {
    super();
  }

  override get(sid: string, cb: (err: unknown, session?: session.SessionData | null) => void): void {
    try {
      const row = this.db.select().from(sessions).where(eq(sessions.sid, sid)).get();
      if (!row) return cb(null, null);
      if (row.expiresAt.getTime() <= this.now()) {
        this.db.delete(sessions).where(eq(sessions.sid, sid)).run();
        return cb(null, null);
      }
      cb(null, JSON.parse(row.data) as session.SessionData);
    } catch (err) {
      cb(err);
    }
  }

  override set(sid: string, sess: session.SessionData, cb?: Callback): void {
    try {
      const now = this.now();
      const createdAt = new Date(sess.signedInAt ?? now);
      const expiresAt = new Date(Math.min(now + this.limits.idleMs, createdAt.getTime() + this.limits.absoluteMs));
      this.db
        .insert(sessions)
        .values({ sid, userId: sess.userId ?? null, data: JSON.stringify(sess), expiresAt, createdAt })
        .onConflictDoUpdate({ target: sessions.sid, set: { userId: sess.userId ?? null, data: JSON.stringify(sess), expiresAt } })
        .run();
      cb?.();
    } catch (err) {
      cb?.(err);
    }
  }

  override touch(sid: string, sess: session.SessionData, cb?: Callback): void {
    try {
      const now = this.now();
      const createdAt = sess.signedInAt ?? now;
      const expiresAt = new Date(Math.min(now + this.limits.idleMs, createdAt + this.limits.absoluteMs));
      this.db.update(sessions).set({ expiresAt }).where(eq(sessions.sid, sid)).run();
      cb?.();
    } catch (err) {
      cb?.(err);
    }
  }

  override destroy(sid: string, cb?: Callback): void {
    try {
      this.db.delete(sessions).where(eq(sessions.sid, sid)).run();
      cb?.();
    } catch (err) {
      cb?.(err);
    }
  }

  /** End every session of a user at once (deactivation, password change elsewhere). Returns how many. */
  destroyAllForUser(userId: number, exceptSid?: string): number {
    const where = exceptSid
      ? sql`${sessions.userId} = ${userId} and ${sessions.sid} <> ${exceptSid}`
      : eq(sessions.userId, userId);
    return this.db.delete(sessions).where(where).run().changes;
  }

  /** Remove expired rows. */
  prune(): number {
    return this.db.delete(sessions).where(lte(sessions.expiresAt, new Date(this.now()))).run().changes;
  }
}
