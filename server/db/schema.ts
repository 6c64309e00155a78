// Drizzle schema of Tocsin's SQLite database. Migrations in ./drizzle are generated from this
// file with `npm run db:generate` (drizzle-kit) and never edited by hand.
// Times are stored as integer milliseconds since the Unix epoch (UTC); names end in `At`.
import { sql } from 'drizzle-orm';
import { index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../shared/roles';
import { FORCE_MODELS, SOLUTION_SOURCE_KINDS, TRACKED_OBJECT_KINDS } from '../../shared/schemas/objects';
import { RUN_STATUSES } from '../../shared/schemas/runs';

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

/**
 * Objects the office tracks. The summary columns (latest solution, next close approach, risk figures, last run)
 * are kept on the row so the list can be sorted and paged in SQL at 10 000 objects; each sort column has an
 * index (SQLite appends the rowid to every index, so ORDER BY col, id is served by the index on col).
 * The risk columns stay null until assessment runs exist and write them.
 */
export const trackedObjects = sqliteTable(
  'tracked_objects',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    designation: text('designation').notNull().unique(),
    name: text('name'),
    kind: text('kind', { enum: TRACKED_OBJECT_KINDS }).notNull(),
    notes: text('notes').notNull().default(''),
    watch: integer('watch', { mode: 'boolean' }).notNull().default(false),
    createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    solutionCount: integer('solution_count').notNull().default(0),
    latestSolutionVersion: integer('latest_solution_version'),
    latestSolutionAt: integer('latest_solution_at', { mode: 'timestamp_ms' }),
    nextCloseApproachAt: integer('next_close_approach_at', { mode: 'timestamp_ms' }),
    maxImpactProbability: real('max_impact_probability'),
    cumulativePalermo: real('cumulative_palermo'),
    maxTorino: integer('max_torino'),
    lastRunAt: integer('last_run_at', { mode: 'timestamp_ms' }),
  },
  (t) => [
    index('tracked_objects_name_idx').on(t.name),
    index('tracked_objects_kind_idx').on(t.kind),
    index('tracked_objects_watch_idx').on(t.watch),
    index('tracked_objects_created_at_idx').on(t.createdAt),
    index('tracked_objects_latest_solution_at_idx').on(t.latestSolutionAt),
    index('tracked_objects_next_close_approach_at_idx').on(t.nextCloseApproachAt),
    index('tracked_objects_max_impact_probability_idx').on(t.maxImpactProbability),
    index('tracked_objects_cumulative_palermo_idx').on(t.cumulativePalermo),
    index('tracked_objects_max_torino_idx').on(t.maxTorino),
    index('tracked_objects_last_run_at_idx').on(t.lastRunAt),
  ],
);

/**
 * Orbit-solution versions of an object: immutable once written (the service only inserts), numbered 1, 2, ...
 * per object. `orbitJson` is the engine's NormalizedOrbit, `classificationJson` the ClassificationSummary
 * (shared/schemas/objects.ts); `rawText` is the text exactly as received and `inputSha256` its hash.
 */
export const orbitSolutions = sqliteTable(
  'orbit_solutions',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    version: integer('version').notNull(),
    sourceKind: text('source_kind', { enum: SOLUTION_SOURCE_KINDS }).notNull(),
    fileName: text('file_name'),
    rawText: text('raw_text').notNull(),
    inputSha256: text('input_sha256').notNull(),
    epochTdbDays: real('epoch_tdb_days').notNull(),
    observationArcDays: real('observation_arc_days'),
    observationCount: integer('observation_count'),
    fitRmsArcsec: real('fit_rms_arcsec'),
    forceModel: text('force_model', { enum: FORCE_MODELS }).notNull(),
    /** Comma-separated non-gravitational terms in the model, e.g. "A1,A2" ('' for gravity only). */
    nonGravTerms: text('non_grav_terms').notNull().default(''),
    remark: text('remark'),
    orbitJson: text('orbit_json').notNull(),
    classificationJson: text('classification_json').notNull(),
    createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [uniqueIndex('orbit_solutions_object_version_idx').on(t.objectId, t.version)],
);

/**
 * Assessment runs: durable engine jobs (server/services/runs). A run is inserted 'queued'; a runner claims it
 * atomically (status 'running' with its lease owner and expiry, attempts + 1), heartbeats the lease while the
 * engine works, and finishes it 'done' (result JSON), 'failed' (error) or 'cancelled'. A 'running' run whose lease
 * expired (its process died) is put back to 'queued' and claimed again, so none is lost or run twice at a time.
 * `optionsJson` is RunOptions, `provenanceJson` RunProvenance (shared/schemas/runs.ts), `resultJson` the engine's
 * assess JSON. Progress: `progressDone` of `progressTotal` in `progressStage`, rate in clones/s, ETA in seconds.
 */
export const assessmentRuns = sqliteTable(
  'assessment_runs',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    solutionId: integer('solution_id')
      .notNull()
      .references(() => orbitSolutions.id, { onDelete: 'restrict' }),
    solutionVersion: integer('solution_version').notNull(),
    inputSha256: text('input_sha256').notNull(),
    optionsJson: text('options_json').notNull(),
    status: text('status', { enum: RUN_STATUSES }).notNull().default('queued'),
    progressStage: text('progress_stage'),
    progressDone: real('progress_done').notNull().default(0),
    progressTotal: real('progress_total').notNull().default(0),
    rateClonesPerS: real('rate_clones_per_s'),
    etaS: real('eta_s'),
    error: text('error'),
    attempts: integer('attempts').notNull().default(0),
    leaseOwner: text('lease_owner'),
    leaseExpiresAt: integer('lease_expires_at', { mode: 'timestamp_ms' }),
    createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    startedAt: integer('started_at', { mode: 'timestamp_ms' }),
    finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
    provenanceJson: text('provenance_json'),
    resultJson: text('result_json'),
  },
  (t) => [
    index('assessment_runs_status_idx').on(t.status, t.id),
    index('assessment_runs_object_idx').on(t.objectId, t.id),
    index('assessment_runs_solution_idx').on(t.solutionId),
  ],
);

export type UserRow = typeof users.$inferSelect;
export type NewUserRow = typeof users.$inferInsert;
export type InvitationRow = typeof invitations.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type TrackedObjectRow = typeof trackedObjects.$inferSelect;
export type OrbitSolutionRow = typeof orbitSolutions.$inferSelect;
export type AssessmentRunRow = typeof assessmentRuns.$inferSelect;
