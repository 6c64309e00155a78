// Drizzle schema of Tocsin's SQLite database. Migrations in ./drizzle are generated from this
// file with `npm run db:generate` (drizzle-kit) and never edited by hand.
// Times are stored as integer milliseconds since the Unix epoch (UTC); names end in `At`.
import { sql } from 'drizzle-orm';
import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../shared/roles';

const nowMs = sql`(cast(unixepoch('subsecond') * 1000 as integer))`;

export const users = sqliteTable('users', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  /** Stored lower-case and trimmed. */
  email: text('email').notNull().unique(),
  name: text('name').notNull(),
  role: text('role', { enum: ROLES }).notNull(),
  /** argon2id PHC string; null until an invited user has chosen a password. */
  passwordHash: text('password_hash'),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  lastSignInAt: integer('last_sign_in_at', { mode: 'timestamp_ms' }),
  passwordChangedAt: integer('password_changed_at', { mode: 'timestamp_ms' }),
});

/** express-session data, one row per session (server/services/sessionStore.ts). */
export const sessions = sqliteTable(
  'sessions',
  {
    sid: text('sid').primaryKey(),
    /** Copied out of the session data so all sessions of a user can be ended at once. */
    userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
    /** JSON of the express-session SessionData. */
    data: text('data').notNull(),
    /** Idle expiry, pushed forward on every request but never past the absolute limit. */
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [index('sessions_user_idx').on(t.userId), index('sessions_expires_idx').on(t.expiresAt)],
);

/** One-time invitation links. Only the SHA-256 of the token is stored. */
export const invitations = sqliteTable(
  'invitations',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    tokenHash: text('token_hash').notNull().unique(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    invitedById: integer('invited_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    acceptedAt: integer('accepted_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('invitations_user_idx').on(t.userId)],
);

/**
 * Outgoing e-mail, written before sending (outbox pattern): a message survives a crash or an
 * unreachable SMTP server and is retried (server/services/mail.ts).
 */
export const mailOutbox = sqliteTable(
  'mail_outbox',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    html: text('html'),
    status: text('status', { enum: ['pending', 'sent', 'failed'] }).notNull().default('pending'),
    attempts: integer('attempts').notNull().default(0),
    lastError: text('last_error'),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('mail_outbox_status_idx').on(t.status)],
);

/** Office-wide settings as key/value text (e.g. the office name shown on documents). */
export const settings = sqliteTable('settings', {
  key: text('key').primaryKey(),
  value: text('value').notNull(),
});

export type UserRow = typeof users.$inferSelect;
export type NewUserRow = typeof users.$inferInsert;
export type InvitationRow = typeof invitations.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
