// HTTP shapes of orbit determination (issue 8): observatories, astrometry per object, fit jobs and adopting a
// fit as a new solution version. Request bodies are validated by the server with these schemas; the client uses
// the inferred types. Dates are ISO 8601 UTC strings.
import { z } from 'zod';
import { RUN_STATUSES } from './runs';
import { adesIssueSchema, fitSettingsSchema, observatorySchema, opticalObservationSchema, orbitDeterminationResultSchema } from './od';

// --- observatories: GET/POST /api/observatories, PUT/DELETE /api/observatories/:code -------------------------
export const observatoryRowSchema = z.object({
  code: z.string(),
  name: z.string(),
  longitudeDeg: z.number(),
  rhoCosPhi: z.number().nullable(),
  rhoSinPhi: z.number().nullable(),
  geodeticLatitudeDeg: z.number().nullable(),
  heightM: z.number().nullable(),
  /** Observations that name this code (an observatory in use cannot be deleted: 409). */
  observationCount: z.number().int(),
  updatedAt: z.string(),
});
export type ObservatoryRow = z.infer<typeof observatoryRowSchema>;
export const saveObservatoryBodySchema = observatorySchema;

// --- POST /api/observatories/import: a file in the CLI's form ({"observatories": [...]}, shared/schemas/od.ts
// observatoryFileSchema), all or nothing. Multipart: field `file` plus an optional `mode` field.
export const OBSERVATORY_IMPORT_MODES = ['add-only', 'replace'] as const;
export type ObservatoryImportMode = (typeof OBSERVATORY_IMPORT_MODES)[number];
/** Largest observatory file accepted (bytes of text). */
export const MAX_OBSERVATORY_FILE_BYTES = 900_000;
export const observatoryImportModeSchema = z.enum(OBSERVATORY_IMPORT_MODES).default('add-only');
/** POST body when not multipart. `mode`: codes already in the table are refused (add-only) or replaced like PUT. */
export const importObservatoriesBodySchema = z.strictObject({
  fileName: z.string().trim().max(200).optional(),
  text: z.string().min(1, 'The file is empty').max(MAX_OBSERVATORY_FILE_BYTES, 'The file is too large (900 kB at most)'),
  mode: observatoryImportModeSchema,
});
export type ImportObservatoriesBody = z.input<typeof importObservatoriesBodySchema>;
/** The other fields of a multipart import. */
export const importObservatoriesFieldsSchema = z.object({ mode: observatoryImportModeSchema });

/**
 * One problem of a refused file (422 unprocessable, details.issues): `entry` is 1-based in the file's
 * `observatories` array (null for the file as a whole), `code` the entry's code as written (when it has one),
 * `field` the entry's field (null for the whole entry), `kind` 'exists' for a code already in the table (add-only).
 */
export const observatoryImportIssueSchema = z.object({
  entry: z.number().int().positive().nullable(),
  code: z.string().nullable(),
  field: z.string().nullable(),
  kind: z.enum(['invalid', 'duplicate', 'exists']),
  message: z.string(),
});
export type ObservatoryImportIssue = z.infer<typeof observatoryImportIssueSchema>;

/** 200 answer: codes added, replaced (stored position or name differed) and unchanged (identical, not rewritten). */
export const importObservatoriesResultSchema = z.object({
  fileName: z.string().nullable(),
  mode: z.enum(OBSERVATORY_IMPORT_MODES),
  added: z.number().int(),
  replaced: z.number().int(),
  unchanged: z.number().int(),
  addedCodes: z.array(z.string()),
  replacedCodes: z.array(z.string()),
  unchangedCodes: z.array(z.string()),
});
export type ImportObservatoriesResult = z.infer<typeof importObservatoriesResultSchema>;

// --- astrometry: GET/POST /api/objects/:id/astrometry, PATCH /api/objects/:id/astrometry/:obsId ---------------
/** POST body when not multipart (multipart: field `file`). */
export const uploadAstrometryBodySchema = z.strictObject({
  fileName: z.string().trim().max(200).optional(),
  text: z.string().min(1, 'The file is empty').max(5_000_000, 'The file is too large (5 MB at most)'),
});

export const storedObservationSchema = opticalObservationSchema.extend({
  id: z.number().int(),
  batchId: z.number().int(),
  /** Analyst's manual exclusion (kept out of every fit, shown greyed). */
  excluded: z.boolean(),
  excludedReason: z.string().nullable(),
});
export type StoredObservation = z.infer<typeof storedObservationSchema>;

export const astrometryBatchSchema = z.object({
  id: z.number().int(),
  fileName: z.string().nullable(),
  sha256: z.string(),
  observationCount: z.number().int(),
  duplicatesSkipped: z.number().int(),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
});
export type AstrometryBatch = z.infer<typeof astrometryBatchSchema>;

export const astrometryListSchema = z.object({
  batches: z.array(astrometryBatchSchema),
  observations: z.array(storedObservationSchema),
});
export type AstrometryList = z.infer<typeof astrometryListSchema>;

/** 201 answer of an upload. A refused file answers 422 { error: { code: 'INVALID_ASTROMETRY', message, issues: AdesIssue[] } }. */
export const uploadAstrometryResultSchema = z.object({
  batch: astrometryBatchSchema,
  added: z.number().int(),
  /** Lines already stored for this object (same station and time): skipped, not an error. */
  duplicates: z.array(z.object({ line: z.number().int(), stn: z.string(), obsTime: z.string(), existingId: z.number().int() })),
});
export type UploadAstrometryResult = z.infer<typeof uploadAstrometryResultSchema>;
export { adesIssueSchema };

export const updateObservationBodySchema = z.strictObject({
  excluded: z.boolean(),
  reason: z.string().trim().max(500).optional(),
});

// --- fits: POST/GET /api/objects/:id/fits, GET /api/fits/:id, DELETE /api/fits/:id, POST /api/fits/:id/adopt ------
export const createFitBodySchema = fitSettingsSchema;

export const fitJobSchema = z.object({
  id: z.number().int(),
  objectId: z.number().int(),
  designation: z.string(),
  status: z.enum(RUN_STATUSES),
  settings: fitSettingsSchema,
  progressStage: z.string().nullable(),
  progressDone: z.number(),
  progressTotal: z.number(),
  error: z.string().nullable(),
  observationCount: z.number().int(),
  /** The stored observations the fit was given, in the order of the engine's input: residual.index -> id. */
  observationIds: z.array(z.number().int()),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  /** Present when status is 'done' (GET /api/fits/:id only; lists leave it null). */
  result: orbitDeterminationResultSchema.nullable(),
  /** Set once a fit was adopted as a solution version. */
  adopted: z
    .object({ which: z.enum(['gravity-only', 'non-gravitational']), solutionId: z.number().int(), solutionVersion: z.number().int(), reason: z.string(), byName: z.string().nullable(), at: z.string() })
    .nullable(),
});
export type FitJob = z.infer<typeof fitJobSchema>;

export const adoptFitBodySchema = z.strictObject({
  which: z.enum(['gravity-only', 'non-gravitational']),
  reason: z.string().trim().min(3, 'Give the reason for this choice').max(2000),
});
export type AdoptFitBody = z.infer<typeof adoptFitBodySchema>;
