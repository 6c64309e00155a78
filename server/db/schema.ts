// Drizzle schema of Tocsin's SQLite database. Migrations in ./drizzle are generated from this
// file with `npm run db:generate` (drizzle-kit) and never edited by hand.
// Times are stored as integer milliseconds since the Unix epoch (UTC); names end in `At`.
import { sql } from 'drizzle-orm';
import { blob, index, integer, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { BULLETIN_STATES, VERSION_STATUSES } from '../../shared/bulletins/workflow';
import { ROLES } from '../../shared/roles';
import { FORCE_MODELS, SOLUTION_SOURCE_KINDS, TRACKED_OBJECT_KINDS } from '../../shared/schemas/objects';
import { RUN_STATUSES } from '../../shared/schemas/runs';
import { STAKEHOLDER_KINDS } from '../../shared/schemas/bulletins';
import { RELEASE_STATES } from '../../shared/releases/workflow';

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
    /** Earliest time of the next attempt (backoff after a failure); null = now. */
    nextAttemptAt: integer('next_attempt_at', { mode: 'timestamp_ms' }),
    /** A sender claimed the row until this time (so two senders never send the same row at once). */
    claimedUntil: integer('claimed_until', { mode: 'timestamp_ms' }),
  },
  (t) => [index('mail_outbox_status_idx').on(t.status)],
);

/** Files attached to an outbox message (e.g. a bulletin PDF), stored with it so a retry sends the same bytes. */
export const mailAttachments = sqliteTable(
  'mail_attachments',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    outboxId: integer('outbox_id')
      .notNull()
      .references(() => mailOutbox.id, { onDelete: 'cascade' }),
    filename: text('filename').notNull(),
    contentType: text('content_type').notNull(),
    content: blob('content', { mode: 'buffer' }).notNull(),
  },
  (t) => [index('mail_attachments_outbox_idx').on(t.outboxId)],
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
 * Columns every durable job table has (assessment runs, orbit fits): the shared lease runner
 * (server/services/jobs/leaseRunner.ts) reads and writes them by these names. Functions, so each table gets its own
 * column builders; spread in this order the generated SQL is what the migrations already created.
 */
function jobProgressColumns() {
  return {
    status: text('status', { enum: RUN_STATUSES }).notNull().default('queued'),
    progressStage: text('progress_stage'),
    progressDone: real('progress_done').notNull().default(0),
    progressTotal: real('progress_total').notNull().default(0),
  };
}
function jobLeaseColumns() {
  return {
    error: text('error'),
    attempts: integer('attempts').notNull().default(0),
    leaseOwner: text('lease_owner'),
    leaseExpiresAt: integer('lease_expires_at', { mode: 'timestamp_ms' }),
    createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    startedAt: integer('started_at', { mode: 'timestamp_ms' }),
    finishedAt: integer('finished_at', { mode: 'timestamp_ms' }),
  };
}

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
    ...jobProgressColumns(),
    rateClonesPerS: real('rate_clones_per_s'),
    etaS: real('eta_s'),
    ...jobLeaseColumns(),
    provenanceJson: text('provenance_json'),
    resultJson: text('result_json'),
  },
  (t) => [
    index('assessment_runs_status_idx').on(t.status, t.id),
    index('assessment_runs_object_idx').on(t.objectId, t.id),
    index('assessment_runs_solution_idx').on(t.solutionId),
  ],
);

/**
 * Bulletins (issue 6): one row per bulletin with its working draft. `documentJson` is the draft's TipTap JSON
 * (shared/bulletins/document.ts); `revision` goes up by one on every save (a save names the revision it edits and
 * is refused with 409 when that is not the current one). `draftVersion` is the number the draft becomes when
 * approved; `latestVersion` the newest locked version. `state` follows shared/bulletins/workflow.ts and only
 * changes by a conditional UPDATE (WHERE state = the state read), so two approvals at once make one version.
 */
export const bulletins = sqliteTable(
  'bulletins',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    number: text('number').notNull().unique(),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    title: text('title').notNull(),
    state: text('state', { enum: BULLETIN_STATES }).notNull().default('draft'),
    documentJson: text('document_json').notNull(),
    revision: integer('revision').notNull().default(1),
    draftVersion: integer('draft_version').notNull().default(1),
    latestVersion: integer('latest_version'),
    /** Writer of the current draft (creator, or whoever started the new version). */
    authorId: integer('author_id').references(() => users.id, { onDelete: 'set null' }),
    updatedById: integer('updated_by_id').references(() => users.id, { onDelete: 'set null' }),
    /** The author's written reason for submitting with out-of-date figures (cleared when a new draft version starts). */
    staleReason: text('stale_reason'),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('bulletins_object_idx').on(t.objectId), index('bulletins_state_idx').on(t.state)],
);

/**
 * Locked versions: written once at approval and never changed except `status` (approved -> distributed ->
 * superseded / withdrawn). `contentJson` is the canonical JSON (keys sorted, no whitespace) of VersionContent
 * (shared/schemas/bulletins.ts: document, figure snapshots with their runs, sign-off) and `sha256` its SHA-256.
 */
export const bulletinVersions = sqliteTable(
  'bulletin_versions',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    bulletinId: integer('bulletin_id')
      .notNull()
      .references(() => bulletins.id, { onDelete: 'restrict' }),
    version: integer('version').notNull(),
    status: text('status', { enum: VERSION_STATUSES }).notNull().default('approved'),
    title: text('title').notNull(),
    contentJson: text('content_json').notNull(),
    sha256: text('sha256').notNull(),
    authorId: integer('author_id').references(() => users.id, { onDelete: 'set null' }),
    reviewerId: integer('reviewer_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [uniqueIndex('bulletin_versions_bulletin_version_idx').on(t.bulletinId, t.version)],
);

/** Review history: every transition with its actor and comment (request-changes notes, sign-off comments, ...). */
export const bulletinEvents = sqliteTable(
  'bulletin_events',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    bulletinId: integer('bulletin_id')
      .notNull()
      .references(() => bulletins.id, { onDelete: 'cascade' }),
    action: text('action').notNull(),
    fromState: text('from_state', { enum: BULLETIN_STATES }),
    toState: text('to_state', { enum: BULLETIN_STATES }),
    version: integer('version'),
    actorId: integer('actor_id').references(() => users.id, { onDelete: 'set null' }),
    comment: text('comment'),
    /** Extra JSON (e.g. the confirmed figures of a sign-off). */
    detailJson: text('detail_json'),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('bulletin_events_bulletin_idx').on(t.bulletinId, t.id)],
);

/** Submissions with out-of-date figures: the author's written reason and which figures were stale (kept). */
export const staleFigureConfirmations = sqliteTable(
  'stale_figure_confirmations',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    bulletinId: integer('bulletin_id')
      .notNull()
      .references(() => bulletins.id, { onDelete: 'cascade' }),
    draftVersion: integer('draft_version').notNull(),
    revision: integer('revision').notNull(),
    reason: text('reason').notNull(),
    /** JSON [{index, runId, latestRunId, quantity}] of the stale figures at submission. */
    figuresJson: text('figures_json').notNull(),
    userId: integer('user_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('stale_figure_confirmations_bulletin_idx').on(t.bulletinId)],
);

export const stakeholderLists = sqliteTable('stakeholder_lists', {
  id: integer('id').primaryKey({ autoIncrement: true }),
  name: text('name').notNull().unique(),
  kind: text('kind', { enum: STAKEHOLDER_KINDS }).notNull(),
  description: text('description').notNull().default(''),
  createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
});

/** A member is a user (userId; liaisons get a briefing in their inbox) or an outside address (email + name). */
export const stakeholderMembers = sqliteTable(
  'stakeholder_members',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    listId: integer('list_id')
      .notNull()
      .references(() => stakeholderLists.id, { onDelete: 'cascade' }),
    userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
    email: text('email'),
    name: text('name'),
  },
  (t) => [index('stakeholder_members_list_idx').on(t.listId)],
);

/** One sending of a locked version to a stakeholder list (at most once per version and list). */
export const distributions = sqliteTable(
  'distributions',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    bulletinId: integer('bulletin_id')
      .notNull()
      .references(() => bulletins.id, { onDelete: 'restrict' }),
    versionId: integer('version_id')
      .notNull()
      .references(() => bulletinVersions.id, { onDelete: 'restrict' }),
    listId: integer('list_id')
      .notNull()
      .references(() => stakeholderLists.id, { onDelete: 'restrict' }),
    /** The list's name and kind when sent (the list may change later). */
    listName: text('list_name').notNull(),
    listKind: text('list_kind', { enum: STAKEHOLDER_KINDS }).notNull(),
    sentById: integer('sent_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [uniqueIndex('distributions_version_list_idx').on(t.versionId, t.listId), index('distributions_bulletin_idx').on(t.bulletinId)],
);

/**
 * Per-recipient delivery rows: the e-mail is the linked outbox row (its status and attempts are the delivery log);
 * for users the row is also their briefing, acknowledged with `acknowledgedAt`.
 */
export const distributionRecipients = sqliteTable(
  'distribution_recipients',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    distributionId: integer('distribution_id')
      .notNull()
      .references(() => distributions.id, { onDelete: 'cascade' }),
    userId: integer('user_id').references(() => users.id, { onDelete: 'set null' }),
    email: text('email').notNull(),
    name: text('name').notNull(),
    outboxId: integer('outbox_id').references(() => mailOutbox.id, { onDelete: 'set null' }),
    acknowledgedAt: integer('acknowledged_at', { mode: 'timestamp_ms' }),
    acknowledgeComment: text('acknowledge_comment'),
  },
  (t) => [
    uniqueIndex('distribution_recipients_distribution_email_idx').on(t.distributionId, t.email),
    index('distribution_recipients_user_idx').on(t.userId),
  ],
);

export type UserRow = typeof users.$inferSelect;
export type NewUserRow = typeof users.$inferInsert;
export type InvitationRow = typeof invitations.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type TrackedObjectRow = typeof trackedObjects.$inferSelect;
export type OrbitSolutionRow = typeof orbitSolutions.$inferSelect;
export type AssessmentRunRow = typeof assessmentRuns.$inferSelect;
export type BulletinRow = typeof bulletins.$inferSelect;
export type BulletinVersionRow = typeof bulletinVersions.$inferSelect;

// ---------------------------------------------------------------------------------------------------------------
// Press releases (issue 7). A release starts from one approved bulletin version: `figuresJson` is a COPY of that
// version's frozen figure snapshot. `state` follows shared/releases/workflow.ts and only changes by a conditional
// UPDATE (WHERE state = the state read). `publishAt` (UTC) is the database's record of what is scheduled: the
// scheduler (server/services/releases/scheduler.ts) is re-armed from it on every start and publishes a release by
// the conditional UPDATE scheduled -> published, so each release is published exactly once.

export const releases = sqliteTable(
  'releases',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    number: text('number').notNull().unique(),
    bulletinId: integer('bulletin_id')
      .notNull()
      .references(() => bulletins.id, { onDelete: 'restrict' }),
    bulletinVersion: integer('bulletin_version').notNull(),
    /** SHA-256 of the bulletin version the figures were copied from. */
    bulletinSha256: text('bulletin_sha256').notNull(),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    title: text('title').notNull(),
    summary: text('summary').notNull().default(''),
    state: text('state', { enum: RELEASE_STATES }).notNull().default('draft'),
    documentJson: text('document_json').notNull(),
    /** The copied figure snapshot (FigureSnapshot[] of the bulletin version). */
    figuresJson: text('figures_json').notNull(),
    revision: integer('revision').notNull().default(1),
    draftVersion: integer('draft_version').notNull().default(1),
    latestVersion: integer('latest_version'),
    authorId: integer('author_id').references(() => users.id, { onDelete: 'set null' }),
    updatedById: integer('updated_by_id').references(() => users.id, { onDelete: 'set null' }),
    /** The scheduled publication instant (UTC); null when not scheduled. */
    publishAt: integer('publish_at', { mode: 'timestamp_ms' }),
    /** The IANA zone the time was entered in (display only). */
    publishTimeZone: text('publish_time_zone'),
    publishedAt: integer('published_at', { mode: 'timestamp_ms' }),
    /** The version that was published. */
    publishedVersion: integer('published_version'),
    /** publishedAt - publishAt in ms. */
    lateByMs: integer('late_by_ms'),
    publishedOnStart: integer('published_on_start', { mode: 'boolean' }).notNull().default(false),
    /** Public address, set at publication. */
    slug: text('slug').unique(),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
    updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('releases_state_publish_idx').on(t.state, t.publishAt), index('releases_published_idx').on(t.publishedAt)],
);

/** Locked wordings: written once at approval, never changed. `contentJson` is canonical JSON, `sha256` its hash. */
export const releaseVersions = sqliteTable(
  'release_versions',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    releaseId: integer('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'restrict' }),
    version: integer('version').notNull(),
    contentJson: text('content_json').notNull(),
    sha256: text('sha256').notNull(),
    reviewerId: integer('reviewer_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [uniqueIndex('release_versions_release_version_idx').on(t.releaseId, t.version)],
);

/** Every transition of a release (incl. the scheduler's publication with how late it was). */
export const releaseEvents = sqliteTable(
  'release_events',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    releaseId: integer('release_id')
      .notNull()
      .references(() => releases.id, { onDelete: 'cascade' }),
    action: text('action').notNull(),
    fromState: text('from_state', { enum: RELEASE_STATES }),
    toState: text('to_state', { enum: RELEASE_STATES }),
    version: integer('version'),
    actorId: integer('actor_id').references(() => users.id, { onDelete: 'set null' }),
    comment: text('comment'),
    publishAt: integer('publish_at', { mode: 'timestamp_ms' }),
    detailJson: text('detail_json'),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('release_events_release_idx').on(t.releaseId, t.id)],
);

export type ReleaseRow = typeof releases.$inferSelect;
export type ReleaseVersionRow = typeof releaseVersions.$inferSelect;

// ---------------------------------------------------------------------------------------------------------------
// Orbit determination (issue 8): the office's observatories, astrometry per object (batches as received and one
// row per observation) and orbit-fit jobs. METHODS.md §9.

/** The office's observatory table (code = ADES `stn`). Either the parallax constants or latitude and height. */
export const observatories = sqliteTable('observatories', {
  code: text('code').primaryKey(),
  name: text('name').notNull(),
  /** East longitude, degrees [0, 360). */
  longitudeDeg: real('longitude_deg').notNull(),
  rhoCosPhi: real('rho_cos_phi'),
  rhoSinPhi: real('rho_sin_phi'),
  geodeticLatitudeDeg: real('geodetic_latitude_deg'),
  heightM: real('height_m'),
  createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  updatedAt: integer('updated_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  updatedById: integer('updated_by_id').references(() => users.id, { onDelete: 'set null' }),
});

/** One uploaded ADES PSV file of an object: the text exactly as received, its SHA-256 and what was kept. */
export const astrometryBatches = sqliteTable(
  'astrometry_batches',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    fileName: text('file_name'),
    rawText: text('raw_text').notNull(),
    sha256: text('sha256').notNull(),
    /** Observations stored from this file. */
    observationCount: integer('observation_count').notNull(),
    /** Lines skipped because the object already had the same observation (same station and time). */
    duplicatesSkipped: integer('duplicates_skipped').notNull().default(0),
    createdById: integer('created_by_id').references(() => users.id, { onDelete: 'set null' }),
    createdAt: integer('created_at', { mode: 'timestamp_ms' }).notNull().default(nowMs),
  },
  (t) => [index('astrometry_batches_object_idx').on(t.objectId, t.id)],
);

/**
 * Optical observations (shared/schemas/od.ts OpticalObservation), immutable except the analyst's manual exclusion.
 * `obsKey` is the engine's observationKey (station + instant to the millisecond): unique per object, so the same
 * observation uploaded twice is stored once.
 */
export const observations = sqliteTable(
  'observations',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    batchId: integer('batch_id')
      .notNull()
      .references(() => astrometryBatches.id, { onDelete: 'restrict' }),
    line: integer('line').notNull(),
    permId: text('perm_id'),
    provId: text('prov_id'),
    trkSub: text('trk_sub'),
    mode: text('mode').notNull(),
    stn: text('stn')
      .notNull()
      .references(() => observatories.code, { onDelete: 'restrict' }),
    obsTime: text('obs_time').notNull(),
    obsTimeTdbDays: real('obs_time_tdb_days').notNull(),
    raDeg: real('ra_deg').notNull(),
    decDeg: real('dec_deg').notNull(),
    rmsRaArcsec: real('rms_ra_arcsec'),
    rmsDecArcsec: real('rms_dec_arcsec'),
    rmsCorr: real('rms_corr'),
    astCat: text('ast_cat'),
    mag: real('mag'),
    band: text('band'),
    remarks: text('remarks'),
    obsKey: text('obs_key').notNull(),
    excluded: integer('excluded', { mode: 'boolean' }).notNull().default(false),
    excludedReason: text('excluded_reason'),
    excludedById: integer('excluded_by_id').references(() => users.id, { onDelete: 'set null' }),
    excludedAt: integer('excluded_at', { mode: 'timestamp_ms' }),
  },
  (t) => [
    uniqueIndex('observations_object_key_idx').on(t.objectId, t.obsKey),
    index('observations_object_time_idx').on(t.objectId, t.obsTimeTdbDays),
    index('observations_batch_idx').on(t.batchId),
    index('observations_stn_idx').on(t.stn),
  ],
);

/**
 * Orbit-fit jobs: durable like assessment runs (same lease, heartbeat, fencing and recovery, one implementation in
 * server/services/jobs/leaseRunner.ts). The input is fixed when queued: the ids of the object's non-excluded
 * observations (`observationIdsJson`, with the SHA-256 of their canonical JSON) and a copy of the observatories
 * they use (`observatoriesJson`). `settingsJson` is FitSettings, `resultJson` the engine's
 * OrbitDeterminationResult. `adopted*` record the one adoption of a fit as a solution version.
 */
export const orbitFits = sqliteTable(
  'orbit_fits',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    objectId: integer('object_id')
      .notNull()
      .references(() => trackedObjects.id, { onDelete: 'restrict' }),
    settingsJson: text('settings_json').notNull(),
    observationIdsJson: text('observation_ids_json').notNull(),
    observationsSha256: text('observations_sha256').notNull(),
    observationCount: integer('observation_count').notNull(),
    observatoriesJson: text('observatories_json').notNull(),
    ...jobProgressColumns(),
    ...jobLeaseColumns(),
    resultJson: text('result_json'),
    adoptedWhich: text('adopted_which', { enum: ['gravity-only', 'non-gravitational'] }),
    adoptedSolutionId: integer('adopted_solution_id').references(() => orbitSolutions.id, { onDelete: 'restrict' }),
    adoptedReason: text('adopted_reason'),
    adoptedById: integer('adopted_by_id').references(() => users.id, { onDelete: 'set null' }),
    adoptedAt: integer('adopted_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('orbit_fits_status_idx').on(t.status, t.id), index('orbit_fits_object_idx').on(t.objectId, t.id)],
);

export type ObservatoryRow = typeof observatories.$inferSelect;
export type AstrometryBatchRow = typeof astrometryBatches.$inferSelect;
export type ObservationRow = typeof observations.$inferSelect;
export type OrbitFitRow = typeof orbitFits.$inferSelect;
