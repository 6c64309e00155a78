// Press releases (issue 7): request and response shapes of /api/releases (signed in) and of the public JSON under
// /api/public/releases (no sign-in). Dates are ISO 8601 strings in UTC ("2026-12-02T14:00:00.000Z").
//
// A release starts from one approved bulletin version: its figures are COPIED from that version's frozen snapshot
// (never live) and stated in plain language as well (shared/releases/plainLanguage.ts). The wording is edited with the
// bulletin editor (same TipTap document schema; linked figures must be figures copied from the bulletin version, risk
// tables and plots are not allowed in public text). A reviewer who is not the author approves the wording, which locks
// it as version N; communications staff then schedule publication (embargo until then). The scheduler publishes it
// exactly once at that time (or on the next start when the server was down, recording how late).
//
// Resources (signed in):
//   GET  /api/releases?state=                      -> ReleaseListResponse
//   POST /api/releases  CreateReleaseBody           -> 201 Release  (422 when the bulletin version is not approved/distributed)
//   GET  /api/releases/:id                          -> Release
//   PUT  /api/releases/:id  UpdateReleaseBody       -> Release; 409 {error:{code:'conflict', details:{current: Release}}}
//                                                     when `revision` is not the current one (draft states only)
//   POST /api/releases/:id/schedule  ScheduleBody   -> Release (schedule from approved, reschedule when scheduled)
//   POST /api/releases/:id/cancel    CancelBody     -> Release
//   POST /api/releases/:id/transitions  ReleaseTransitionBody -> Release (every user action of the workflow table,
//                                                     incl. schedule/reschedule with publishAt and cancel with comment;
//                                                     422 guard failed, 403 role/four-eyes refusal, 409 state changed)
//   GET  /api/releases/:id/versions/:version        -> ReleaseVersion (a locked wording)
// Public, no sign-in (only published releases ever appear; anything else is 404 / absent):
//   GET  /api/public/releases                       -> PublicReleaseListResponse (newest publication first)
//   GET  /api/public/releases/:slug                 -> PublicRelease
//   GET  /public, /public/releases/:slug            -> HTML pages (server-rendered)
//   GET  /public/feed.atom                          -> Atom 1.0 feed (RFC 4287)
import { z } from 'zod';
import { bulletinDocumentSchema } from '../bulletins/document';
import { RELEASE_ACTIONS, RELEASE_STATES } from '../releases/workflow';
import { figureSnapshotSchema } from './bulletins';

export const releaseStateSchema = z.enum(RELEASE_STATES);
export const releaseActionSchema = z.enum(RELEASE_ACTIONS);

const userRefSchema = z.object({ id: z.number().int(), name: z.string() });

export const MAX_RELEASE_TITLE = 200;
export const MAX_RELEASE_SUMMARY = 600;

/** An ISO 8601 date-time WITH a zone (Z or ±hh:mm): the client converts the user's local time, the server stores UTC. */
export const publishAtSchema = z.iso.datetime({ offset: true });

/** An IANA time zone name as entered by the user (shown back with the time; the stored instant is UTC). */
export const timeZoneSchema = z
  .string()
  .trim()
  .min(1)
  .max(64)
  .refine((tz) => {
    try {
      new Intl.DateTimeFormat('en', { timeZone: tz });
      return true;
    } catch {
      return false;
    }
  }, 'Unknown time zone');

// ---------- requests ----------

export const releaseListQuerySchema = z.object({ state: releaseStateSchema.optional() });

export const createReleaseBodySchema = z.strictObject({
  bulletinId: z.number().int().positive(),
  version: z.number().int().positive(),
  /** Default: the bulletin version's title. */
  title: z.string().trim().min(1).max(MAX_RELEASE_TITLE).optional(),
});
export type CreateReleaseBody = z.input<typeof createReleaseBodySchema>;

export const updateReleaseBodySchema = z.strictObject({
  /** The revision this edit was made on (Release.revision as last read). */
  revision: z.number().int().min(1),
  title: z.string().trim().min(1, 'Enter a title').max(MAX_RELEASE_TITLE).optional(),
  /** One or two sentences shown in the list and the feed. */
  summary: z.string().trim().max(MAX_RELEASE_SUMMARY).optional(),
  document: bulletinDocumentSchema.optional(),
});
export type UpdateReleaseBody = z.input<typeof updateReleaseBodySchema>;

export const scheduleBodySchema = z.strictObject({
  /** The publication instant, with its zone offset; stored in UTC. */
  publishAt: publishAtSchema,
  /** The zone the user entered the time in (display only). */
  timeZone: timeZoneSchema.optional(),
});
export type ScheduleBody = z.input<typeof scheduleBodySchema>;

export const cancelBodySchema = z.strictObject({ comment: z.string().trim().min(1, 'Say why the release is cancelled').max(4000) });
export type CancelBody = z.input<typeof cancelBodySchema>;

export const releaseTransitionBodySchema = z.strictObject({
  action: releaseActionSchema,
  comment: z.string().trim().max(4000).optional(),
  /** schedule / reschedule. */
  publishAt: publishAtSchema.optional(),
  timeZone: timeZoneSchema.optional(),
  /** Optional guard against racing: the revision the actor looked at (409 when the draft changed since). */
  revision: z.number().int().min(1).optional(),
});
export type ReleaseTransitionBody = z.input<typeof releaseTransitionBodySchema>;

// ---------- plain language ----------

/** One figure of the bulletin version in plain words: "about 1 in 12,000", "about 3 times the Moon's distance". */
export const plainStatementSchema = z.object({
  /** Position of the figure in the copied snapshot (FigureSnapshot.index). */
  figureIndex: z.number().int(),
  quantity: z.string(),
  /** "Chance of impact", "Closest distance", ... */
  label: z.string(),
  /** The plain-language statement. */
  text: z.string(),
});
export type PlainStatement = z.infer<typeof plainStatementSchema>;

export const plainLanguageSchema = z.object({
  statements: z.array(plainStatementSchema),
  /** One honest sentence about how certain the figures are. */
  uncertainty: z.string(),
  /** The standing public caution, shown with every release. */
  caution: z.string(),
});
export type PlainLanguage = z.infer<typeof plainLanguageSchema>;

// ---------- release ----------

export const releaseSourceSchema = z.object({
  bulletinId: z.number().int(),
  bulletinNumber: z.string(),
  version: z.number().int(),
  /** SHA-256 of the bulletin version the figures were copied from. */
  sha256: z.string(),
  objectId: z.number().int(),
  objectDesignation: z.string(),
});
export type ReleaseSource = z.infer<typeof releaseSourceSchema>;

export const releaseEventSchema = z.object({
  id: z.number().int(),
  action: z.string(),
  fromState: releaseStateSchema.nullable(),
  toState: releaseStateSchema.nullable(),
  version: z.number().int().nullable(),
  actor: userRefSchema.nullable(),
  comment: z.string().nullable(),
  /** schedule/reschedule: the publication time set; publish: the time it was due. */
  publishAt: z.string().nullable(),
  createdAt: z.string(),
});
export type ReleaseEvent = z.infer<typeof releaseEventSchema>;

/** The scheduling and publication record. */
export const publicationSchema = z.object({
  /** The scheduled instant (UTC), null when not scheduled. */
  publishAt: z.string().nullable(),
  /** The zone the time was entered in (display only). */
  timeZone: z.string().nullable(),
  /** When it was actually published (UTC). */
  publishedAt: z.string().nullable(),
  /** publishedAt − publishAt in ms (0 or a few ms when on time; large when published on start after downtime). */
  lateByMs: z.number().int().nullable(),
  /** Published by the start-up catch-up because the server was down at publishAt. */
  publishedOnStart: z.boolean(),
  /** Public address slug, set at publication. */
  slug: z.string().nullable(),
});
export type Publication = z.infer<typeof publicationSchema>;

export const releaseSummarySchema = z.object({
  id: z.number().int(),
  /** Office release number, e.g. "REL-0001". */
  number: z.string(),
  title: z.string(),
  summary: z.string(),
  state: releaseStateSchema,
  revision: z.number().int(),
  /** The version number the current draft becomes when approved. */
  draftVersion: z.number().int(),
  /** The newest locked (approved) version, null before the first approval. */
  latestVersion: z.number().int().nullable(),
  source: releaseSourceSchema,
  publication: publicationSchema,
  author: userRefSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type ReleaseSummary = z.infer<typeof releaseSummarySchema>;

export const releaseSchema = releaseSummarySchema.extend({
  document: bulletinDocumentSchema,
  /** The figures copied from the bulletin version (frozen; same values, same uncertainty). */
  figures: z.array(figureSnapshotSchema),
  plainLanguage: plainLanguageSchema,
  allowedActions: z.array(releaseActionSchema),
  events: z.array(releaseEventSchema),
  updatedBy: userRefSchema.nullable(),
});
export type Release = z.infer<typeof releaseSchema>;

export const releaseListResponseSchema = z.object({ releases: z.array(releaseSummarySchema) });
export type ReleaseListResponse = z.infer<typeof releaseListResponseSchema>;

/** A locked wording (what is published when its release is published). */
export const releaseVersionSchema = z.object({
  releaseId: z.number().int(),
  number: z.string(),
  version: z.number().int(),
  title: z.string(),
  summary: z.string(),
  document: bulletinDocumentSchema,
  figures: z.array(figureSnapshotSchema),
  plainLanguage: plainLanguageSchema,
  source: releaseSourceSchema,
  author: userRefSchema.nullable(),
  reviewer: userRefSchema.nullable(),
  approvedAt: z.string(),
  /** SHA-256 (hex) of the canonical JSON of the version content. */
  sha256: z.string(),
});
export type ReleaseVersion = z.infer<typeof releaseVersionSchema>;

export const releaseVersionParamsSchema = z.object({ id: z.coerce.number().int().positive(), version: z.coerce.number().int().positive() });

// ---------- public (no sign-in; published releases only) ----------

export const publicFigureSchema = z.object({
  label: z.string(),
  /** As in the bulletin, with units and uncertainty. */
  text: z.string(),
  /** In plain words, or null when there is no plain statement for it. */
  plain: z.string().nullable(),
});
export type PublicFigure = z.infer<typeof publicFigureSchema>;

export const publicReleaseSummarySchema = z.object({
  slug: z.string(),
  number: z.string(),
  title: z.string(),
  summary: z.string(),
  objectDesignation: z.string(),
  publishedAt: z.string(),
  /** Path of the HTML page: /public/releases/:slug. */
  url: z.string(),
});
export type PublicReleaseSummary = z.infer<typeof publicReleaseSummarySchema>;

export const publicReleaseSchema = publicReleaseSummarySchema.extend({
  version: z.number().int(),
  /** The body as plain text, one paragraph per line (linked figures shown with their copied values). */
  text: z.string(),
  /** The body as sanitised HTML (the same as the public page). */
  html: z.string(),
  figures: z.array(publicFigureSchema),
  plainLanguage: plainLanguageSchema,
});
export type PublicRelease = z.infer<typeof publicReleaseSchema>;

export const publicReleaseListResponseSchema = z.object({ releases: z.array(publicReleaseSummarySchema) });
export type PublicReleaseListResponse = z.infer<typeof publicReleaseListResponseSchema>;
