// Bulletins, versions, stakeholder lists, distributions and briefings (issue 6): request and response shapes of
// /api/bulletins, /api/distributions, /api/stakeholder-lists and /api/briefings. Dates are ISO 8601 strings (UTC).
//
// Resources:
//   GET  /api/bulletins?objectId=&state=             -> BulletinListResponse
//   POST /api/bulletins  CreateBulletinBody           -> 201 Bulletin
//   GET  /api/bulletins/:id                           -> Bulletin (the draft with its revision, figures and staleness)
//   PUT  /api/bulletins/:id  UpdateBulletinBody       -> Bulletin; 409 {error:{code:'conflict', details:{current: Bulletin}}}
//                                                        when `revision` is not the current one (nothing is lost: the
//                                                        stored copy is returned, the client merges and saves again)
//   POST /api/bulletins/:id/transitions  TransitionBody -> Bulletin (422 when a guard fails, 403 for a role/four-eyes
//                                                        refusal, 409 when the state changed meanwhile)
//   GET  /api/bulletins/:id/versions                  -> VersionListResponse
//   GET  /api/bulletins/:id/versions/:version?against=N -> BulletinVersionDetail (with differences from version N,
//                                                        default the previous version)
//   GET  /api/bulletins/:id/versions/:version/pdf     -> application/pdf
//   GET  /api/stakeholder-lists                       -> StakeholderListListResponse
//   POST /api/stakeholder-lists  StakeholderListBody  -> 201 StakeholderList;  PUT /api/stakeholder-lists/:id -> StakeholderList
//   POST /api/distributions  CreateDistributionBody   -> 201 Distribution
//   GET  /api/distributions?bulletinId=               -> DistributionListResponse;  GET /api/distributions/:id -> Distribution
//   GET  /api/briefings                               -> BriefingListResponse (the signed-in user's inbox)
//   GET  /api/briefings/:id                           -> BriefingDetail
//   GET  /api/briefings/:id/pdf                       -> application/pdf of the briefed version
//   POST /api/briefings/:id/acknowledge  {comment?}   -> Briefing
import { z } from 'zod';
import { bulletinDocumentSchema, figureQuantitySchema, figureValueSchema, linkedFigureAttrsSchema } from '../bulletins/document';
import { BULLETIN_ACTIONS, BULLETIN_STATES, VERSION_STATUSES } from '../bulletins/workflow';

export const bulletinStateSchema = z.enum(BULLETIN_STATES);
export const bulletinActionSchema = z.enum(BULLETIN_ACTIONS);
export const versionStatusSchema = z.enum(VERSION_STATUSES);

const userRefSchema = z.object({ id: z.number().int(), name: z.string() });
export type UserRef = z.infer<typeof userRefSchema>;

export const MAX_TITLE = 200;

// ---------- requests ----------

export const bulletinListQuerySchema = z.object({
  objectId: z.coerce.number().int().positive().optional(),
  state: bulletinStateSchema.optional(),
});
export type BulletinListQuery = z.input<typeof bulletinListQuerySchema>;

export const createBulletinBodySchema = z.strictObject({
  objectId: z.number().int().positive(),
  title: z.string().trim().min(1, 'Enter a title').max(MAX_TITLE),
  /** Optional starting document (default: one empty paragraph). */
  document: bulletinDocumentSchema.optional(),
});
export type CreateBulletinBody = z.input<typeof createBulletinBodySchema>;

export const updateBulletinBodySchema = z.strictObject({
  /** The revision this edit was made on (Bulletin.revision as last read). */
  revision: z.number().int().min(1),
  title: z.string().trim().min(1, 'Enter a title').max(MAX_TITLE).optional(),
  document: bulletinDocumentSchema,
});
export type UpdateBulletinBody = z.input<typeof updateBulletinBodySchema>;

export const confirmedFigureSchema = z.object({
  /** Position of the figure among the draft's linked figures (0-based, document order). */
  index: z.number().int().min(0),
  runId: z.number().int().positive(),
  quantity: figureQuantitySchema,
});
export type ConfirmedFigure = z.infer<typeof confirmedFigureSchema>;

export const transitionBodySchema = z.strictObject({
  action: bulletinActionSchema,
  comment: z.string().trim().max(4000).optional(),
  /** approve: every linked figure the reviewer confirmed (all are required). */
  confirmedFigures: z.array(confirmedFigureSchema).max(500).optional(),
  /** submit with out-of-date figures: why they are left as they are (kept with the bulletin). */
  staleReason: z.string().trim().max(4000).optional(),
  /** Optional guard against racing: the revision the actor looked at (409 when the draft changed since). */
  revision: z.number().int().min(1).optional(),
});
export type TransitionBody = z.input<typeof transitionBodySchema>;

// ---------- bulletin ----------

/** A linked figure of the draft, its value from the bound run and whether a newer run of the object exists. */
export const figureStatusSchema = z.object({
  index: z.number().int(),
  attrs: linkedFigureAttrsSchema,
  /** Value from the bound run; null when the run is missing, not done, or lacks the approach. */
  value: figureValueSchema.nullable(),
  /** Why value is null. */
  problem: z.string().nullable(),
  /** Out of date: the bound run is not the object's latest completed run, or its solution is not the latest. */
  stale: z.boolean(),
  /** Why it is out of date: a newer completed run exists, or only a newer solution version (no run of it yet). */
  staleBecause: z.enum(['newerRun', 'newerSolution']).nullable().optional(),
  latestRunId: z.number().int().nullable(),
  /** The value from the latest run (shown beside a stale figure; rebinding sets attrs.runId to latestRunId). */
  latestValue: figureValueSchema.nullable(),
});
export type FigureStatus = z.infer<typeof figureStatusSchema>;

export const bulletinEventSchema = z.object({
  id: z.number().int(),
  action: z.string(),
  fromState: bulletinStateSchema.nullable(),
  toState: bulletinStateSchema.nullable(),
  version: z.number().int().nullable(),
  actor: userRefSchema.nullable(),
  comment: z.string().nullable(),
  createdAt: z.string(),
});
export type BulletinEvent = z.infer<typeof bulletinEventSchema>;

export const bulletinSummarySchema = z.object({
  id: z.number().int(),
  /** Office bulletin number, e.g. "HSPDO-B-0001". */
  number: z.string(),
  title: z.string(),
  objectId: z.number().int(),
  objectDesignation: z.string(),
  state: bulletinStateSchema,
  /** Autosave revision of the draft (starts at 1, +1 per save). */
  revision: z.number().int(),
  /** The version number the current draft becomes when approved. */
  draftVersion: z.number().int(),
  /** The newest locked version, null before the first approval. */
  latestVersion: z.number().int().nullable(),
  author: userRefSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type BulletinSummary = z.infer<typeof bulletinSummarySchema>;

export const bulletinSchema = bulletinSummarySchema.extend({
  document: bulletinDocumentSchema,
  figures: z.array(figureStatusSchema),
  staleFigureCount: z.number().int(),
  /** The written reason the author gave for submitting with out-of-date figures (kept), if any. */
  staleReason: z.string().nullable(),
  /** Actions the signed-in user may take now (from the workflow table, role and four-eyes). */
  allowedActions: z.array(bulletinActionSchema),
  events: z.array(bulletinEventSchema),
  updatedBy: userRefSchema.nullable(),
});
export type Bulletin = z.infer<typeof bulletinSchema>;

export const bulletinListResponseSchema = z.object({ bulletins: z.array(bulletinSummarySchema) });
export type BulletinListResponse = z.infer<typeof bulletinListResponseSchema>;

// ---------- versions ----------

export const figureSnapshotSchema = z.object({
  index: z.number().int(),
  attrs: linkedFigureAttrsSchema,
  value: figureValueSchema,
});
export type FigureSnapshot = z.infer<typeof figureSnapshotSchema>;

export const signOffSchema = z.object({
  reviewer: userRefSchema,
  comment: z.string().nullable(),
  confirmedFigures: z.array(confirmedFigureSchema),
  approvedAt: z.string(),
});
export type SignOff = z.infer<typeof signOffSchema>;

export const versionSummarySchema = z.object({
  bulletinId: z.number().int(),
  version: z.number().int(),
  status: versionStatusSchema,
  title: z.string(),
  author: userRefSchema.nullable(),
  reviewer: userRefSchema.nullable(),
  approvedAt: z.string(),
  /** SHA-256 (hex) of the canonical JSON of the version content (see server/services/bulletins/canonical.ts). */
  sha256: z.string(),
});
export type VersionSummary = z.infer<typeof versionSummarySchema>;

export const versionListResponseSchema = z.object({ versions: z.array(versionSummarySchema) });
export type VersionListResponse = z.infer<typeof versionListResponseSchema>;

/** Readable differences between two versions: text lines and figures. */
export const textDiffOpSchema = z.object({ op: z.enum(['equal', 'insert', 'delete']), text: z.string() });
export const figureDiffSchema = z.object({
  /** Figure position in the newer version (null when removed) and in the older one (null when added). */
  index: z.number().int().nullable(),
  previousIndex: z.number().int().nullable(),
  quantity: figureQuantitySchema,
  change: z.enum(['added', 'removed', 'changed', 'rebound', 'unchanged']),
  before: figureValueSchema.nullable(),
  after: figureValueSchema.nullable(),
});
export type FigureDiff = z.infer<typeof figureDiffSchema>;
export const versionDiffSchema = z.object({
  against: z.number().int(),
  title: z.object({ before: z.string(), after: z.string() }).nullable(),
  text: z.array(textDiffOpSchema),
  figures: z.array(figureDiffSchema),
});
export type VersionDiff = z.infer<typeof versionDiffSchema>;

/**
 * The content that is hashed (canonical JSON: object keys sorted, no whitespace, UTF-8): exactly these fields.
 */
export const versionContentSchema = z.object({
  bulletinId: z.number().int(),
  number: z.string(),
  version: z.number().int(),
  title: z.string(),
  objectId: z.number().int(),
  objectDesignation: z.string(),
  document: bulletinDocumentSchema,
  figures: z.array(figureSnapshotSchema),
  /** Runs the document refers to (figures, risk tables, plots). */
  runIds: z.array(z.number().int()),
  author: userRefSchema.nullable(),
  signOff: signOffSchema,
  staleReason: z.string().nullable(),
});
export type VersionContent = z.infer<typeof versionContentSchema>;

export const bulletinVersionSchema = versionContentSchema.extend({
  status: versionStatusSchema,
  sha256: z.string(),
  createdAt: z.string(),
});
export type BulletinVersion = z.infer<typeof bulletinVersionSchema>;

export const bulletinVersionDetailSchema = bulletinVersionSchema.extend({
  /** Differences from an earlier version (null for version 1 without ?against). */
  diff: versionDiffSchema.nullable(),
});
export type BulletinVersionDetail = z.infer<typeof bulletinVersionDetailSchema>;

export const versionParamsSchema = z.object({ id: z.coerce.number().int().positive(), version: z.coerce.number().int().positive() });
export const versionQuerySchema = z.object({ against: z.coerce.number().int().positive().optional() });

// ---------- stakeholder lists ----------

export const STAKEHOLDER_KINDS = ['government', 'partner', 'internal', 'press'] as const;
export const stakeholderKindSchema = z.enum(STAKEHOLDER_KINDS);
export const STAKEHOLDER_KIND_LABELS: Record<(typeof STAKEHOLDER_KINDS)[number], string> = {
  government: 'Government liaisons',
  partner: 'Partner offices',
  internal: 'Internal',
  /** Press list: receives every press release by e-mail when it is published (issue 7). */
  press: 'Press',
};

/** A member is a Tocsin user (incl. liaisons, who then get a briefing in their inbox) or an outside address. */
export const stakeholderMemberInputSchema = z.union([
  z.strictObject({ userId: z.number().int().positive() }),
  z.strictObject({ email: z.email().max(254), name: z.string().trim().min(1).max(200) }),
]);
export type StakeholderMemberInput = z.infer<typeof stakeholderMemberInputSchema>;

export const stakeholderListBodySchema = z.strictObject({
  name: z.string().trim().min(1).max(200),
  kind: stakeholderKindSchema,
  description: z.string().trim().max(2000).default(''),
  members: z.array(stakeholderMemberInputSchema).max(500),
});
export type StakeholderListBody = z.input<typeof stakeholderListBodySchema>;

export const stakeholderMemberSchema = z.object({
  id: z.number().int(),
  userId: z.number().int().nullable(),
  name: z.string(),
  email: z.string(),
  /** The user's role, null for outside addresses. */
  role: z.string().nullable(),
});
export type StakeholderMember = z.infer<typeof stakeholderMemberSchema>;

export const stakeholderListSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: stakeholderKindSchema,
  description: z.string(),
  members: z.array(stakeholderMemberSchema),
  createdAt: z.string(),
});
export type StakeholderList = z.infer<typeof stakeholderListSchema>;
export const stakeholderListListResponseSchema = z.object({ lists: z.array(stakeholderListSchema) });

// ---------- distributions ----------

export const createDistributionBodySchema = z.strictObject({
  bulletinId: z.number().int().positive(),
  version: z.number().int().positive(),
  listId: z.number().int().positive(),
});
export type CreateDistributionBody = z.input<typeof createDistributionBodySchema>;

export const distributionListQuerySchema = z.object({ bulletinId: z.coerce.number().int().positive().optional() });

export const DELIVERY_STATUSES = ['pending', 'sent', 'failed'] as const;
export const recipientSchema = z.object({
  id: z.number().int(),
  userId: z.number().int().nullable(),
  name: z.string(),
  email: z.string(),
  /** Delivery of the e-mail (from the mail outbox row). */
  status: z.enum(DELIVERY_STATUSES),
  attempts: z.number().int(),
  lastError: z.string().nullable(),
  sentAt: z.string().nullable(),
  /** Briefing acknowledgement (users only; outside addresses cannot acknowledge). */
  acknowledgedAt: z.string().nullable(),
  acknowledgeComment: z.string().nullable(),
});
export type Recipient = z.infer<typeof recipientSchema>;

export const distributionSchema = z.object({
  id: z.number().int(),
  bulletinId: z.number().int(),
  bulletinNumber: z.string(),
  title: z.string(),
  version: z.number().int(),
  sha256: z.string(),
  list: z.object({ id: z.number().int(), name: z.string(), kind: stakeholderKindSchema }),
  sentBy: userRefSchema.nullable(),
  createdAt: z.string(),
  recipients: z.array(recipientSchema),
  counts: z.object({ total: z.number().int(), sent: z.number().int(), pending: z.number().int(), failed: z.number().int(), acknowledged: z.number().int() }),
});
export type Distribution = z.infer<typeof distributionSchema>;
export const distributionListResponseSchema = z.object({ distributions: z.array(distributionSchema) });

// ---------- briefings (a liaison's inbox) ----------

export const briefingSchema = z.object({
  /** The delivery (recipient) row id. */
  id: z.number().int(),
  distributionId: z.number().int(),
  bulletinId: z.number().int(),
  bulletinNumber: z.string(),
  title: z.string(),
  objectDesignation: z.string(),
  version: z.number().int(),
  sha256: z.string(),
  sentBy: userRefSchema.nullable(),
  sentAt: z.string(),
  acknowledgedAt: z.string().nullable(),
  acknowledgeComment: z.string().nullable(),
});
export type Briefing = z.infer<typeof briefingSchema>;
export const briefingListResponseSchema = z.object({ briefings: z.array(briefingSchema) });

export const briefingDetailSchema = briefingSchema.extend({
  /** Plain-text summary (the same as the e-mail's). */
  summaryText: z.string(),
  figures: z.array(figureSnapshotSchema),
  document: bulletinDocumentSchema,
  /** Where the PDF of the version can be downloaded by this user: /api/briefings/:id/pdf. */
  pdfUrl: z.string(),
});
export type BriefingDetail = z.infer<typeof briefingDetailSchema>;

export const acknowledgeBodySchema = z.strictObject({ comment: z.string().trim().max(2000).optional() });
